/** Files dropped anywhere on the page are loaded; while a file is dragged over, the page says so. */
import { useEffect, useState } from 'react';
import { fileOpen } from '../../state/loadActions';

function hasFiles(e: DragEvent): boolean {
  return Array.from(e.dataTransfer?.types ?? []).includes('Files');
}

export function PageDrop() {
  const [over, setOver] = useState(false);
  useEffect(() => {
    let timer = 0;
    const onOver = (e: DragEvent) => {
      if (!hasFiles(e)) return;
      e.preventDefault(); // allows the drop
      setOver(true);
      // dragover repeats while the pointer moves or rests over the page; its end hides the notice
      clearTimeout(timer);
      timer = window.setTimeout(() => setOver(false), 400);
    };
    const onDrop = (e: DragEvent) => {
      setOver(false);
      if (e.defaultPrevented || !hasFiles(e)) return; // the snapshot panel's drop zone took it
      e.preventDefault();
      const f = e.dataTransfer?.files?.[0];
      if (f) void fileOpen(f, f.name);
    };
    window.addEventListener('dragover', onOver);
    window.addEventListener('drop', onDrop);
    return () => {
      clearTimeout(timer);
      window.removeEventListener('dragover', onOver);
      window.removeEventListener('drop', onDrop);
    };
  }, []);
  return over ? (
    <div className="page-drop" data-testid="page-drop" aria-hidden="true">
      <p>Drop to load the snapshot (text, .gz, .npy, .npz, HDF5)</p>
    </div>
  ) : null;
}
