/** The first page: the demo snapshot, its Ewald computation in a worker, and the result. */
import { RunPanel } from './components/RunPanel';
import { SnapshotPanel } from './components/SnapshotPanel';
import { StatsPanel } from './components/StatsPanel';

export function App() {
  return (
    <div className="page">
      <header className="topbar">
        <h1 className="brand">torusgrav</h1>
        <p className="tagline">exact periodic gravity for N-body snapshots · Ewald summation, computed on this device</p>
      </header>
      <main className="layout">
        <div className="column">
          <RunPanel />
          <SnapshotPanel />
        </div>
        <div className="column">
          <StatsPanel />
        </div>
      </main>
      <footer className="footer">Everything runs in your browser; no data leaves this page.</footer>
    </div>
  );
}
