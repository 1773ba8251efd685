/**
 * The force methods the inspector can compare, as data: what each is called, what it needs, which
 * parameters it takes (with defaults, shown and editable), and whether this build can run it. Adding a
 * method means adding an entry here, a parser in methodOptions.ts (orders and PME: moreOptions.ts), a
 * request in the worker (worker/methodRequests.ts) and its plan in methodPlan.ts.
 */

export type MethodId = 'ewald' | 'file' | 'mesh' | 'sphere' | 'cube' | 'slab' | 'screened' | 'nearest' | 'pme';

export type MethodKind = 'reference' | 'file' | 'underTest' | 'order' | 'fast';

export interface ParamSpec {
  /** Key inside a slot's parameter record, namespaced by method ("ewald.tol"). */
  readonly key: string;
  readonly label: string;
  readonly defaultValue: string;
  /** A fixed list of choices (shown as a select), or free text checked by the method's parser. */
  readonly choices?: readonly { readonly value: string; readonly label: string }[];
  readonly hint: string;
  /** Shown only when another parameter has one of these values. */
  readonly when?: { readonly key: string; readonly values: readonly string[] };
}

export interface MethodSpec {
  readonly id: MethodId;
  readonly label: string;
  /** A few words for the legend and the table ("Ewald", "PM 32³"). */
  readonly short: string;
  readonly kind: MethodKind;
  readonly description: string;
  /** Whether this build has the engine for it. */
  readonly ready: boolean;
  readonly params: readonly ParamSpec[];
}

const SOFTENING: readonly ParamSpec[] = [
  {
    key: 'ewald.softening',
    label: 'softening',
    defaultValue: 'none',
    choices: [
      { value: 'none', label: 'none (point masses)' },
      { value: 'plummer', label: 'Plummer ε' },
      { value: 'spline', label: 'cubic spline h' },
    ],
    hint: 'the pair kernel the reference uses at short range',
  },
  {
    key: 'ewald.eps',
    label: 'ε or h',
    defaultValue: '0.001',
    hint: 'Plummer length ε, or the spline kernel’s support h (length units)',
    when: { key: 'ewald.softening', values: ['plummer', 'spline'] },
  },
];

/** Options shared by the layered image sums (sphere, cube, slab); the keys are shared so that switching keeps them. */
const ORDER_TOL: ParamSpec = {
  key: 'order.tol',
  label: 'exact-part tolerance',
  defaultValue: '1e-10',
  hint: 'relative tolerance of the parts summed in closed form (far-cell multipoles, in-plane and screened sums), in [1e-14, 1e-2]',
};

const ORDER_COMMON: readonly ParamSpec[] = [
  {
    key: 'order.background',
    label: 'mean density',
    defaultValue: 'removed',
    choices: [
      { value: 'removed', label: 'removed (each cell with its uniform background)' },
      { value: 'kept', label: 'kept (point images only)' },
    ],
    hint: 'with the background each image cell is neutral and the sum tends to Ewald plus the shape term of the dipole; without it, to Ewald minus the homologous term',
  },
  ORDER_TOL,
];

export const METHODS: readonly MethodSpec[] = [
  {
    id: 'ewald',
    label: 'Ewald reference',
    short: 'Ewald',
    kind: 'reference',
    description: 'exact periodic sum (mean density removed), to the tolerance you set',
    ready: true,
    params: [
      { key: 'ewald.tol', label: 'tolerance', defaultValue: '1e-6', hint: 'relative force error to meet, in (0, 1)' },
      ...SOFTENING,
      {
        key: 'ewald.all',
        label: 'all particles by',
        defaultValue: 'auto',
        choices: [
          { value: 'auto', label: 'PME if too slow' },
          { value: 'direct', label: 'direct Ewald always' },
        ],
        hint: 'when B is asked for every particle and direct Ewald would take longer than the time budget (8 s), particle-mesh Ewald at the same tolerance (rms) is the reference instead',
      },
    ],
  },
  {
    id: 'file',
    label: 'from file',
    short: 'file',
    kind: 'file',
    description: 'the accelerations stored in the loaded snapshot (your code’s)',
    ready: true,
    params: [],
  },
  {
    id: 'mesh',
    label: 'coarse mesh (code under test)',
    short: 'mesh',
    kind: 'underTest',
    description: 'our own deliberately coarse particle-mesh solver (CIC, no short-range correction): a stand-in for “your code”',
    ready: true,
    params: [
      {
        key: 'mesh.n',
        label: 'mesh points per side',
        defaultValue: '32',
        choices: ['8', '16', '32', '64', '128'].map((v) => ({ value: v, label: `${v}³` })),
        hint: 'finer meshes resolve shorter separations; forces are smoothed below about two cells',
      },
    ],
  },
  {
    id: 'sphere',
    label: 'image sum, spherical shells',
    short: 'sphere',
    kind: 'order',
    description: 'plain sum over periodic images, whole cells added in growing spheres; tends to Ewald + (4πG/3V)·D',
    ready: true,
    params: [
      { key: 'sphere.shells', label: 'shells R', defaultValue: '32', hint: 'largest sphere radius, in units of the longest box side: a whole number from 1 to 4096' },
      ...ORDER_COMMON,
    ],
  },
  {
    id: 'cube',
    label: 'image sum, cubic shells',
    short: 'cube',
    kind: 'order',
    description: 'plain sum over periodic images, whole cells added in growing cubes (|n_i| ≤ R); tends to Ewald + G N·D/V of a box-shaped prism',
    ready: true,
    params: [
      { key: 'cube.shells', label: 'shells R', defaultValue: '32', hint: 'largest cube half-width in cells: a whole number from 1 to 4096' },
      ...ORDER_COMMON,
    ],
  },
  {
    id: 'slab',
    label: 'image sum, slab',
    short: 'slab',
    kind: 'order',
    description: 'plain sum over periodic images, layers of cells added across a growing slab; tends to Ewald + (4πG/V) D along the normal',
    ready: true,
    params: [
      {
        key: 'slab.axis',
        label: 'slab normal',
        defaultValue: 'z',
        choices: ['x', 'y', 'z'].map((v) => ({ value: v, label: `${v} (layers stacked along ${v})` })),
        hint: 'the axis along which layers of cells are added; the slab is infinite across it',
      },
      { key: 'slab.shells', label: 'layers R', defaultValue: '8', hint: 'largest layer index |n| along the normal: a whole number from 1 to 4096' },
      ...ORDER_COMMON,
    ],
  },
  {
    id: 'screened',
    label: 'screened image sum',
    short: 'screened',
    kind: 'order',
    description: 'images with a convergence factor e^(−λr) for several λ, extrapolated to λ → 0 (tends to Ewald)',
    ready: true,
    params: [
      {
        key: 'screened.lambdas',
        label: 'λ values',
        defaultValue: 'auto',
        hint: '"auto" = (2, 1, ½, ¼, ⅛) divided by the longest box side, or at least two distinct positive values separated by commas (1/length)',
      },
      ORDER_TOL,
    ],
  },
  {
    id: 'nearest',
    label: 'nearest image only',
    short: 'nearest',
    kind: 'order',
    description: 'each pair once, at its minimum-image separation (no images beyond; no background)',
    ready: true,
    params: [],
  },
  {
    id: 'pme',
    label: 'particle-mesh Ewald',
    short: 'PME',
    kind: 'fast',
    description: 'Ewald split with the long-range part on a mesh (B-splines, FFT): every particle at once; its tolerance is an rms relative error',
    ready: true,
    params: [
      { key: 'pme.tol', label: 'tolerance (rms)', defaultValue: '1e-6', hint: 'rms relative force error over all particles to meet, in (0, 1)' },
      { key: 'pme.mesh', label: 'mesh points per side', defaultValue: 'auto', hint: '"auto" (chosen from the tolerance) or an even whole number from 8 to 1024 with prime factors 2, 3, 5 only (32, 48, 64, 96, 128 …), the same on every side' },
      {
        key: 'pme.order',
        label: 'B-spline order p',
        defaultValue: 'auto',
        choices: [{ value: 'auto', label: 'auto (4 … 8)' }, ...['2', '3', '4', '5', '6', '7', '8', '10', '12'].map((v) => ({ value: v, label: v }))],
        hint: 'assignment order of the mass to the mesh; "auto" lets the tolerance choose',
      },
      {
        key: 'pme.influence',
        label: 'influence function',
        defaultValue: 'optimal',
        choices: [
          { value: 'optimal', label: 'optimal for the assignment' },
          { value: 'spme', label: 'plain B-spline (SPME)' },
        ],
        hint: 'the Green function on the mesh',
      },
      {
        key: 'pme.threads',
        label: 'threads',
        defaultValue: 'auto',
        choices: [{ value: 'auto', label: 'auto (up to 4)' }, ...['1', '2', '3', '4'].map((v) => ({ value: v, label: v }))],
        hint: 'threads sharing the run (helper workers over shared memory; needs a cross-origin isolated page, else one); "auto" uses up to 4 cores from 8192 particles on; results agree to rounding',
      },
      ...SOFTENING,
    ],
  },
];

/** The spec of a method id; throws for an unknown id. */
export function methodSpec(id: MethodId): MethodSpec {
  const m = METHODS.find((x) => x.id === id);
  if (!m) throw new RangeError(`unknown method "${id}"`);
  return m;
}

/** Whether `text` names a method of the registry. */
export function isMethodId(text: string): text is MethodId {
  return METHODS.some((m) => m.id === text);
}

/** Default values of every parameter of every method (one record per slot). */
export function paramDefaults(): Record<string, string> {
  const out: Record<string, string> = {};
  for (const m of METHODS) for (const p of m.params) out[p.key] ??= p.defaultValue;
  return out;
}

/** The parameters of `id` that apply given the current values (the `when` conditions). */
export function paramsVisible(id: MethodId, values: Readonly<Record<string, string>>): readonly ParamSpec[] {
  return methodSpec(id).params.filter((p) => !p.when || p.when.values.includes(values[p.when.key] ?? ''));
}
