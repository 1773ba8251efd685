/** The inspector: snapshot, methods and run on the left; the 3D view, numbers, picked particle and plots on the right. */
import { ExportButton } from './components/ExportButton';
import { MethodsPanel } from './components/MethodsPanel';
import { PickPanel } from './components/PickPanel';
import { PlotsPanel } from './components/PlotsPanel';
import { RunPanel } from './components/RunPanel';
import { SnapshotPanel } from './components/SnapshotPanel';
import { StatsTable } from './components/StatsTable';
import { View3DPanel } from './components/View3DPanel';
import { MappingDialog } from './components/mapping/MappingDialog';
import { PageDrop } from './components/mapping/PageDrop';

export function App() {
  return (
    <div className="page">
      <header className="topbar">
        <h1 className="brand">torusgrav</h1>
        <p className="tagline">force inspector for periodic N-body snapshots · two methods side by side against the exact Ewald sum</p>
        <div className="topbar-actions">
          <ExportButton />
        </div>
      </header>
      <main className="layout">
        <div className="column column-controls">
          <RunPanel />
          <MethodsPanel />
          <SnapshotPanel />
        </div>
        <div className="column column-results">
          <View3DPanel />
          <div className="results-row">
            <StatsTable />
            <PickPanel />
          </div>
        </div>
        <div className="wide">
          <PlotsPanel />
        </div>
      </main>
      <MappingDialog />
      <PageDrop />
      <footer className="footer">Everything runs in your browser; no data leaves this page. The coarse mesh is our own deliberately approximate solver, a stand-in for your code.</footer>
    </div>
  );
}
