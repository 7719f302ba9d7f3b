import { BrandMark } from '@/components/BrandMark';

/** The brand mark without a link into the app, for pages strangers open (a shared report). */
export function PlainBrand() {
  return (
    <span className="flex items-center gap-2 text-xl font-bold">
      <BrandMark />
      Gridproof
    </span>
  );
}
