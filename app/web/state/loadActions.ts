/**
 * Loading a snapshot file: describe it in the worker, then either load it at once (a remembered
 * mapping for its structure, or text whose header names the positions) or open the mapping step; load
 * with the chosen mapping (progress, cancel), make it the snapshot and compute. A file that fails
 * leaves the previous snapshot and its results on screen, with one line naming file and place.
 */
import { createStore } from 'zustand/vanilla';
import { boxParse } from './settings';
import type { SnapshotDescription } from '../../../engine/formats/description';
import { type LoadChoice, type MappingDraft, choiceFromDraft, draftFromChoice, loadDecide, unitsWords } from '../loading/mappingChoice';
import { mappingRecall, mappingRemember } from '../loading/mappingMemory';
import { CancelledError, type Outcome, WorkerCrashError } from '../worker/client';
import { type DescribePayload, LIMIT_ADVICE, type LoadPayload } from '../worker/loadProtocol';
import { computeClient, computeStart } from './pipeline';
import { fileSnapshotMake } from './snapshotLoad';
import { appStore } from './store';
import type { Snapshot } from './types';

/** The file being mapped or last loaded: the File itself (or bytes) and what describe said of it. */
export interface OpenFile {
  readonly input: Blob | Uint8Array;
  readonly fileName: string;
  readonly description: SnapshotDescription;
}

/** The mapping step while it is open. */
export interface MappingStep extends OpenFile {
  readonly draft: MappingDraft;
  /** Time the worker took to describe the file (ms; includes loading h5wasm for HDF5). */
  readonly describeMs: number;
  /** One line: why the last confirm or load failed. */
  readonly error: string;
}

/** How the snapshot on screen was loaded (for "loaded with … · change mapping"). */
export interface LoadUsed extends OpenFile {
  readonly snapshotId: string;
  readonly choice: LoadChoice;
  readonly how: 'remembered' | 'header' | 'confirmed';
  readonly sources: Readonly<Record<string, string>>;
  /** Smallest and largest per-particle softening length read, when the mapping names one. */
  readonly softening: { readonly min: number; readonly max: number } | null;
  /** Wall time from the load request to the particles on the page (ms), and the worker's share. */
  readonly loadMs: number;
  readonly workerMs: number;
}

export interface LoadState {
  readonly step: MappingStep | null;
  readonly used: LoadUsed | null;
}

export const loadStore = createStore<LoadState>()(() => ({ step: null, used: null }));

const app = () => appStore.getState();

let loadLimit: number | undefined;

/** Sets the load limit in bytes of file data (undefined: the engine's default, 1 GiB); for tests. */
export function loadLimitSet(bytes: number | undefined): void {
  loadLimit = bytes;
}

function errorText(error: unknown): string {
  const text = error instanceof Error ? error.message : String(error);
  return error instanceof WorkerCrashError ? `the computing worker stopped: ${text}; restarted — the snapshot and finished results are kept` : text;
}

function fail(message: string): void {
  appStore.setState({ status: 'error', message, progress: 0, phase: '' });
}

/** Bytes are moved to the worker, so every request gets its own copy (a File is passed by reference). */
function inputFor(input: Blob | Uint8Array): Blob | Uint8Array {
  return input instanceof Uint8Array ? input.slice() : input;
}

/**
 * Opens a dropped or chosen file: describes it in the worker, then loads it at once or opens the
 * mapping step. Resolves with the loaded snapshot once its comparison has ended, or null (asked, failed,
 * superseded).
 */
export async function fileOpen(input: Blob | Uint8Array, fileName: string): Promise<Snapshot | null> {
  const client = computeClient();
  if (!client) {
    fail('the compute worker is not available');
    return null;
  }
  const s0 = app();
  const id = s0.computeId + 1;
  const before = { status: s0.status, message: s0.message };
  loadStore.setState({ step: null });
  appStore.setState({
    status: 'loading',
    phase: `looking into ${fileName}`,
    message: '',
    progress: 0,
    computeId: id,
    startedAt: performance.now(),
    // the worker is taken over: a running convergence measurement ends here
    ...(s0.convergenceStatus === 'computing' ? { convergenceStatus: 'cancelled' as const } : {}),
  });
  let description: SnapshotDescription;
  let describeMs = 0;
  try {
    const out = (await client.run({ type: 'describe', file: inputFor(input), fileName })) as Outcome<DescribePayload>;
    description = out.payload.description;
    describeMs = out.workerMs;
  } catch (e) {
    if (app().computeId !== id || e instanceof CancelledError) return null;
    fail(errorText(e));
    return null;
  }
  if (app().computeId !== id) return null;
  const remembered = mappingRecall(description.signature)?.choice ?? null;
  const decision = loadDecide(description, remembered, app().draft.G);
  const file: OpenFile = { input, fileName, description };
  if (decision.kind === 'direct') return loadWith(file, decision.choice, decision.how);
  // the mapping step waits for the user; what was on screen stays (a running computation was stopped)
  const stopped = before.status === 'computing' || before.status === 'loading';
  appStore.setState({
    status: stopped ? 'cancelled' : before.status,
    message: stopped ? `stopped: choose what ${fileName} holds` : before.message,
    phase: '',
    progress: 0,
  });
  loadStore.setState({ step: { ...file, draft: draftFromChoice(description, decision.choice), error: '', describeMs } });
  return null;
}

/** Changes the open mapping step's form. */
export function mappingEdit(patch: Partial<MappingDraft>): void {
  const step = loadStore.getState().step;
  if (step) loadStore.setState({ step: { ...step, draft: { ...step.draft, ...patch }, error: '' } });
}

/** Closes the mapping step without loading (the snapshot on screen stays). */
export function mappingCancel(): void {
  loadStore.setState({ step: null });
}

/** Reopens the mapping step for the snapshot on screen, with the choice it was loaded with. */
export function mappingChange(): void {
  const used = loadStore.getState().used;
  if (!used) return;
  loadStore.setState({ step: { input: used.input, fileName: used.fileName, description: used.description, draft: draftFromChoice(used.description, used.choice), error: '', describeMs: 0 } });
}

/** Confirms the mapping step: remembers the choice for this structure and loads. */
export async function mappingConfirm(): Promise<Snapshot | null> {
  const step = loadStore.getState().step;
  if (!step) return null;
  let choice: LoadChoice;
  try {
    choice = choiceFromDraft(step.draft);
  } catch (e) {
    loadStore.setState({ step: { ...step, error: errorText(e) } });
    return null;
  }
  mappingRemember({ signature: step.description.signature, fileName: step.fileName, savedAt: Date.now(), choice });
  loadStore.setState({ step: null });
  return loadWith(step, choice, 'confirmed');
}

/** Loads a described file with a choice, makes it the snapshot and computes its comparison. */
async function loadWith(file: OpenFile, choice: LoadChoice, how: LoadUsed['how']): Promise<Snapshot | null> {
  const client = computeClient();
  if (!client) {
    fail('the compute worker is not available');
    return null;
  }
  const { fileName } = file;
  const s0 = app();
  const id = s0.computeId + 1;
  const t0 = performance.now();
  appStore.setState({ status: 'loading', phase: `reading ${fileName}`, message: '', progress: 0, computeId: id, startedAt: t0 });
  // a shared link made for this file brings its own settings and box
  const link = s0.wantedFile && s0.wantedFile.name === fileName ? s0.wantedFile.draft : null;
  let typedBox = null;
  try {
    const text = link && choice.mapping.box === undefined ? link.box : choice.boxText;
    typedBox = text !== null ? boxParse(text) : null;
  } catch (e) {
    // a typed box was checked when it was confirmed; a link's unreadable box is simply not used
    if (!link) {
      fail(errorText(e));
      return null;
    }
  }
  let out: Outcome<LoadPayload>;
  try {
    out = (await client.run({ type: 'load', file: inputFor(file.input), fileName, mapping: choice.mapping, box: typedBox, every: choice.every, ...(loadLimit !== undefined ? { maxBytes: loadLimit } : {}) }, (f) => {
      if (app().computeId === id) appStore.setState({ progress: f });
    })) as Outcome<LoadPayload>;
  } catch (e) {
    if (app().computeId !== id || e instanceof CancelledError) return null;
    fail(errorText(e));
    // a mapping the user chose, or a file too large to load whole: the step reopens with the reason,
    // so that the mapping or the subsampling can be changed
    if (how !== 'header' || errorText(e).includes(LIMIT_ADVICE)) loadStore.setState({ step: { ...file, draft: draftFromChoice(file.description, choice), error: errorText(e), describeMs: 0 } });
    return null;
  }
  if (app().computeId !== id) return null;
  const payload = out.payload;
  const s = app();
  const { snapshot, boxText } = fileSnapshotMake(fileName, payload, null, unitsWords(choice.units));
  const draft = link
    ? link
    : {
        ...s.draft,
        G: choice.G || s.draft.G,
        a: snapshot.accelerations ? { ...s.draft.a, method: 'file' as const } : s.draft.a.method === 'file' ? { ...s.draft.a, method: 'mesh' as const } : s.draft.a,
        b: snapshot.accelerations || s.draft.b.method === 'file' ? { ...s.draft.b, method: 'ewald' as const } : s.draft.b,
        box: boxText ?? s.draft.box,
      };
  appStore.setState({ snapshot, draft, comparison: null, selected: null, convergence: null, convergenceStatus: 'idle', wantedFile: null });
  loadStore.setState({ used: { ...file, snapshotId: snapshot.id, choice, how, sources: payload.sources, softening: range(payload.softening), loadMs: performance.now() - t0, workerMs: out.workerMs } });
  await new Promise((r) => setTimeout(r, 0));
  await computeStart();
  return snapshot;
}

function range(a: Float64Array | null): { min: number; max: number } | null {
  if (!a || a.length === 0) return null;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < a.length; i++) {
    if (a[i] < min) min = a[i];
    if (a[i] > max) max = a[i];
  }
  return { min, max };
}

/** Loads a file given as bytes (tests, scripts): the same path as a dropped file. */
export function fileLoad(name: string, bytes: Uint8Array | Blob): Promise<Snapshot | null> {
  return fileOpen(bytes, name);
}
