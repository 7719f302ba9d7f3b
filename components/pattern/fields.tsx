'use client';
/** Small form fields for the pattern editor: a number field that lets a person type freely, and a select. */
import { useId, useState, type ReactNode } from 'react';

/**
 * A number input bound to a number. While focused it keeps what the person types (so "0." or "" are fine
 * mid-edit) and reports every value that parses; on blur it shows the bound value again.
 */
export function NumField({
  label, value, onChange, unit, step = 'any', min, integer = false, testId, hint,
}: {
  label: string; value: number; onChange: (v: number) => void; unit?: string; step?: number | 'any'; min?: number; integer?: boolean; testId?: string; hint?: ReactNode;
}) {
  const [editing, setEditing] = useState<string | null>(null);
  const id = useId();
  const shown = editing ?? (Number.isFinite(value) ? String(value) : '');
  return (
    <div className="field">
      <label htmlFor={id} className="font-bold">{label}{unit ? <span className="font-normal text-muted"> ({unit})</span> : null}</label>
      <input
        id={id}
        className="input font-mono"
        inputMode={integer ? 'numeric' : 'decimal'}
        type="number"
        step={integer ? 1 : step}
        min={min}
        value={shown}
        data-testid={testId}
        onFocus={() => setEditing(shown)}
        onBlur={() => setEditing(null)}
        onChange={(e) => {
          setEditing(e.target.value);
          const v = Number(e.target.value);
          if (e.target.value.trim() !== '' && Number.isFinite(v)) onChange(integer ? Math.round(v) : v);
        }}
      />
      {hint ? <span className="text-sm text-muted">{hint}</span> : null}
    </div>
  );
}

export function SelectField<T extends string>({ label, value, options, onChange, testId }: { label: string; value: T; options: readonly { value: T; label: string }[]; onChange: (v: T) => void; testId?: string }) {
  const id = useId();
  return (
    <div className="field">
      <label htmlFor={id} className="font-bold">{label}</label>
      <select id={id} className="input" value={value} data-testid={testId} onChange={(e) => onChange(e.target.value as T)}>
        {options.map((o) => <option key={o.value} value={o.value}>{o.label}</option>)}
      </select>
    </div>
  );
}

export function TextField({ label, value, onChange, testId, required }: { label: string; value: string; onChange: (v: string) => void; testId?: string; required?: boolean }) {
  const id = useId();
  return (
    <div className="field">
      <label htmlFor={id} className="font-bold">{label}</label>
      <input id={id} className="input" value={value} required={required} data-testid={testId} onChange={(e) => onChange(e.target.value)} />
    </div>
  );
}
