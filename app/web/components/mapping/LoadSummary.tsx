/** How the file on screen was read (which arrays, box, units) and the way back to the mapping step. */
import { formatDuration, formatNumber } from '../../format';
import { choiceWords } from '../../loading/mappingChoice';
import { mappingChange } from '../../state/loadActions';
import { useApp } from '../../state/useApp';
import { useLoad } from './useLoad';

const HOW: Record<string, string> = {
  remembered: 'the mapping you confirmed for this layout',
  header: 'the column names',
  confirmed: 'your mapping',
};

export function LoadSummary() {
  const used = useLoad((s) => s.used);
  const snapshotId = useApp((s) => s.snapshot?.id ?? '');
  if (!used || snapshotId.split('|box=')[0] !== used.snapshotId.split('|box=')[0]) return null;
  return (
    <div className="load-summary" data-testid="load-summary" data-how={used.how} data-load-ms={String(Math.round(used.loadMs))}>
      <p>
        Read with {HOW[used.how]} in {formatDuration(used.loadMs)}: {choiceWords(used.choice).join(' · ')}
      </p>
      {used.softening ? (
        <p data-testid="load-softening">
          Per-particle softening read: {used.softening.min === used.softening.max ? formatNumber(used.softening.min) : `${formatNumber(used.softening.min)} to ${formatNumber(used.softening.max)}`} (length). The methods use the softening
          chosen in their panels.
        </p>
      ) : null}
      <button type="button" className="quiet" data-testid="mapping-change" onClick={mappingChange}>
        change mapping
      </button>
    </div>
  );
}
