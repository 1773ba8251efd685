/** One labelled value of a panel; `value` (the raw number) goes into data-value for tests and tools. */
import type { ReactNode } from 'react';

export interface StatProps {
  readonly name: string;
  readonly label: ReactNode;
  readonly text: string;
  readonly value?: number | string | null;
  readonly unit?: string;
  readonly hint?: string;
}

export function Stat({ name, label, text, value, unit, hint }: StatProps) {
  return (
    <div className="stat" data-key={name} data-value={value === null || value === undefined ? '' : String(value)} title={hint}>
      <dt>{label}</dt>
      <dd>
        <span className="stat-value">{text}</span>
        {unit && text !== '—' ? <span className="stat-unit">{unit}</span> : null}
      </dd>
    </div>
  );
}
