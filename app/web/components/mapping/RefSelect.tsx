/** A select over a file's columns, arrays or datasets, with an optional "none" entry. */
import type { RefOption } from '../../loading/mappingChoice';

export function RefSelect(props: {
  readonly testId: string;
  readonly label: string;
  readonly value: string;
  readonly options: readonly RefOption[];
  readonly none?: string;
  readonly onChange: (value: string) => void;
}) {
  const { testId, label, value, options, none, onChange } = props;
  const known = value === '' || options.some((o) => o.value === value);
  return (
    <label className="map-field">
      <span>{label}</span>
      <select data-testid={testId} value={value} onChange={(e) => onChange(e.target.value)}>
        {none !== undefined ? <option value="">{none}</option> : <option value="">— choose —</option>}
        {known ? null : <option value={value}>{value} (not in this file)</option>}
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </label>
  );
}
