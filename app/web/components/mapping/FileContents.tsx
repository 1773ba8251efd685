/** Everything a described file offers: arrays (columns, datasets) with shape and type, and attributes. */
import type { SnapshotDescription } from '../../../../engine/formats/description';
import { bytesText } from '../../../../engine/formats/description';
import { shapeText } from '../../loading/mappingChoice';

function valueText(v: unknown): string {
  if (v === undefined) return '';
  if (typeof v === 'string') return JSON.stringify(v.length > 60 ? `${v.slice(0, 57)}…` : v);
  if (Array.isArray(v)) return v.length > 8 ? `${v.slice(0, 8).join(', ')}, …` : v.join(', ');
  return String(v);
}

export function FileContents({ d }: { readonly d: SnapshotDescription }) {
  const rowsNote = d.format === 'text' ? ' (rows estimated from the file size)' : '';
  return (
    <div className="map-contents">
      <p className="map-facts" data-testid="map-facts">
        {d.format} file, {bytesText(d.size)}
        {d.text ? `, ${d.text.delimiter}-separated${d.text.header ? ', with column names' : ', no column names'}${d.text.gzip ? ', gzip' : ''}` : ''}
        {d.proposal.count !== null ? ` · N ≈ ${d.proposal.count.toLocaleString('en')}${rowsNote}` : ''}
      </p>
      <table className="map-table" data-testid="map-arrays">
        <caption>{d.format === 'text' ? 'columns' : d.format === 'hdf5' ? 'datasets' : 'arrays'}</caption>
        <thead>
          <tr>
            <th>name</th>
            <th>shape</th>
            <th>type</th>
            <th>note</th>
          </tr>
        </thead>
        <tbody>
          {d.arrays.map((a) => (
            <tr key={a.name || a.label} className={a.usable ? '' : 'map-unusable'}>
              <td className="map-name">{a.name || a.label}</td>
              <td>{shapeText(a.shape)}</td>
              <td>{a.dtype}</td>
              <td>{a.usable ? (a.value !== undefined ? `= ${valueText(a.value)}` : '') : a.note ?? 'not readable as numbers'}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {d.attributes.length > 0 ? (
        <table className="map-table" data-testid="map-attributes">
          <caption>attributes</caption>
          <thead>
            <tr>
              <th>object</th>
              <th>name</th>
              <th>shape</th>
              <th>type</th>
              <th>value</th>
            </tr>
          </thead>
          <tbody>
            {d.attributes.map((a) => (
              <tr key={a.ref}>
                <td className="map-name">{a.path}</td>
                <td className="map-name">{a.name}</td>
                <td>{shapeText(a.shape)}</td>
                <td>{a.dtype}</td>
                <td>{valueText(a.value)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : (
        <p className="map-facts">no attributes</p>
      )}
    </div>
  );
}
