/**
 * Page entry: restores the session (URL first, then the browser's storage), binds the store to the
 * compute worker, renders, computes the first comparison, and keeps the URL and storage in step.
 */
import '@vitejs/plugin-react/preamble';
import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { App } from './App';
import { draftLoad, draftSave, sessionForget, snapshotRestore, snapshotSave } from './state/persist';
import { computeClientSet, computeStart, convergenceStart } from './state/pipeline';
import { DEFAULT_DRAFT, draftFromQuery, draftToQuery, fileFromQuery } from './state/settings';
import { appReset, appStore } from './state/store';
import { computeClientCreate } from './worker/client';
import { planClientSet } from './state/planOffThread';
import { computeSpawnFor, testHooksWanted } from './testHooks';
import { viewFrameLog } from './view3d/scene';
import { planClientCreate } from './worker/planClient';
import { planSpawn } from './worker/planSpawn';
import { serviceWorkerRegister } from './offline/swRegister';
import './styles.css';

/** Follow-up convergence measurement on the first comparison when it is cheap (small snapshots). */
const AUTO_CONVERGENCE_MAX_N = 20_000;

async function start(): Promise<void> {
  // ?fresh forgets the kept session first (the other parameters still apply)
  const query = new URLSearchParams(window.location.search);
  const fresh = query.has('fresh');
  query.delete('fresh');
  query.delete('testhooks');
  if (fresh) await sessionForget();
  const stored = fresh ? null : draftLoad();
  const shared = query.toString() ? `?${query}` : '';
  const draft = shared ? draftFromQuery(shared, stored ?? DEFAULT_DRAFT) : (stored ?? DEFAULT_DRAFT);
  appReset(draft);
  const hooks = testHooksWanted(window.location.search);
  computeClientSet(computeClientCreate(computeSpawnFor(hooks)));
  // the 3D view's recent frames (points drawn, wait for the pixels), for the responsiveness test
  if (hooks) (window as unknown as { __viewFrames: unknown }).__viewFrames = viewFrameLog;
  planClientSet(planClientCreate(planSpawn));
  serviceWorkerRegister();
  createRoot(document.getElementById('root')!).render(
    <StrictMode>
      <App />
    </StrictMode>,
  );
  const wanted = fileFromQuery(shared);
  const kept = fresh ? null : await snapshotRestore();
  if (kept && (!wanted || wanted.name === kept.fileName)) appStore.setState({ snapshot: kept });
  else if (wanted) {
    // the link's settings wait for its file; the demo meanwhile compares the mesh with Ewald
    const demoSlot = (slot: 'a' | 'b', fallback: 'mesh' | 'ewald') => (draft[slot].method === 'file' ? { ...draft[slot], method: fallback } : draft[slot]);
    appStore.setState({ wantedFile: { ...wanted, draft }, draft: { ...draft, a: demoSlot('a', 'mesh'), b: demoSlot('b', 'ewald') } });
  }

  // keep the URL and the storage in step with the form and the snapshot
  let timer = 0;
  appStore.subscribe((s, prev) => {
    if (s.snapshot !== prev.snapshot && (s.snapshot?.kind === 'file' || prev.snapshot?.kind === 'file')) void snapshotSave(s.snapshot);
    if (s.draft === prev.draft && s.snapshot === prev.snapshot) return;
    clearTimeout(timer);
    timer = window.setTimeout(() => {
      const st = appStore.getState();
      draftSave(st.draft);
      // while a link waits for its file, the address keeps the link
      const q = st.wantedFile
        ? draftToQuery(st.wantedFile.draft, { name: st.wantedFile.name, n: st.wantedFile.n ?? 0 })
        : draftToQuery(st.draft, st.snapshot?.kind === 'file' ? { name: st.snapshot.fileName!, n: st.snapshot.n } : null);
      if (q !== window.location.search) history.replaceState(null, '', `${window.location.pathname}${q}`);
    }, 300);
  });

  await computeStart();
  const s = appStore.getState();
  if (s.status === 'done' && s.snapshot && s.snapshot.n <= AUTO_CONVERGENCE_MAX_N) await convergenceStart();
}

void start();
