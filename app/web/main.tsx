/** Page entry: binds the store to the compute worker, renders, then starts the demo computation. */
import '@vitejs/plugin-react/preamble';
import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { App } from './App';
import { draftFromQuery } from './state/settings';
import { appReset, computeClientSet, computeStart } from './state/store';
import { computeClientCreate } from './worker/client';
import { workerSpawn } from './worker/spawn';
import './styles.css';

appReset(draftFromQuery(window.location.search));
computeClientSet(computeClientCreate(workerSpawn));
createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <App />
  </StrictMode>,
);
void computeStart();
