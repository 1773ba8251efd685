/** "Export report": one self-contained HTML file with the settings, the numbers, the plots and the 3D view. */
import { exportReportHtml } from '../report/reportHtml';
import { appStore } from '../state/store';
import { useApp } from '../state/useApp';

function download(name: string, text: string): void {
  const url = URL.createObjectURL(new Blob([text], { type: 'text/html' }));
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export function ExportButton() {
  const ready = useApp((s) => s.comparison !== null);
  const onClick = () => {
    const canvas = document.querySelector<HTMLCanvasElement>('[data-testid=viewport-3d] canvas');
    let image: string | null = null;
    try {
      image = canvas ? canvas.toDataURL('image/png') : null;
    } catch {
      image = null;
    }
    const s = appStore.getState();
    const { name, html } = exportReportHtml(s, image, new Date(), window.location.href);
    download(name, html);
  };
  return (
    <button type="button" className="secondary-calm" data-testid="export-report" disabled={!ready} onClick={onClick}>
      Export report
    </button>
  );
}
