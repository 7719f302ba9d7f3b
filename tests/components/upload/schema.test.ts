import { describe, expect, it } from 'vitest';
import { photoProblem, REFERENCE_CHOICES, UploadFormSchema } from '@/components/upload/schema';

describe('the upload form', () => {
  it('sends the square in millimetres whatever unit it was typed in', () => {
    // 1 in = 25.4 mm exactly (international yard and pound agreement, 1959): a 4 in square is 101.6 mm.
    const r = UploadFormSchema.parse({ bedId: 'b1', size: '4', units: 'in' });
    expect(r.referenceMm).toBeCloseTo(101.6, 12);
    expect(UploadFormSchema.parse({ bedId: 'b1', size: '150.2', units: 'mm' }).referenceMm).toBe(150.2);
    expect(REFERENCE_CHOICES.find((c) => c.label === '4 in')!.mm).toBeCloseTo(101.6, 12);
  });

  it('refuses a missing bed, a size of 0, text, and a square larger than the API takes', () => {
    const fields = (v: unknown) => {
      const r = UploadFormSchema.safeParse(v);
      return r.success ? [] : r.error.issues.map((i) => String(i.path[0]));
    };
    expect(fields({ bedId: '', size: '150', units: 'mm' })).toEqual(['bedId']);
    expect(fields({ bedId: 'b', size: '0', units: 'mm' })).toEqual(['size']);
    expect(fields({ bedId: 'b', size: 'abc', units: 'mm' })).toEqual(['size']);
    // 80 in = 2032 mm, above the 2000 mm the API accepts for referenceMm.
    expect(fields({ bedId: 'b', size: '80', units: 'in' })).toEqual(['size']);
    expect(fields({ bedId: 'b', size: '78', units: 'in' })).toEqual([]);
  });

  it('says what is wrong with the chosen file before sending it', () => {
    expect(photoProblem(null, 1000)).toMatch(/Choose or take/);
    expect(photoProblem({ size: 0, type: 'image/jpeg' }, 1000)).toMatch(/empty/);
    expect(photoProblem({ size: 10, type: 'application/pdf' }, 1000)).toMatch(/not a photo/);
    expect(photoProblem({ size: 3 * 1048576, type: 'image/jpeg' }, 2 * 1048576)).toMatch(/3\.0 MB; the limit is 2\.0 MB/);
    expect(photoProblem({ size: 500, type: 'image/jpeg' }, 1000)).toBeNull();
    // Some phones hand over a HEIC photo with no type at all; the server sniffs the bytes.
    expect(photoProblem({ size: 500, type: '' }, 1000)).toBeNull();
  });
});
