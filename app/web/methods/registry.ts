/**
 * The force methods the inspector can compare, as data: what each is called, what it needs, which
 * parameters it takes (with defaults, shown and editable), and whether this build can run it. Adding a
 * method (an image-sum order, the fast all-particle method) means adding an entry here, a parser in
 * methodOptions.ts, a case in the worker's handleRequest and, for predictions, one in methodPlan.ts.
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
    description: 'plain sum over periodic images added in growing spheres',
    ready: false,
    params: [{ key: 'order.shells', label: 'shells', defaultValue: '8', hint: 'largest shell radius, in box sides' }],
  },
  {
    id: 'cube',
    label: 'image sum, cubic shells',
    short: 'cube',
    kind: 'order',
    description: 'plain sum over periodic images added in growing cubes',
    ready: false,
    params: [{ key: 'order.shells', label: 'shells', defaultValue: '8', hint: 'largest shell, in box sides' }],
  },
  {
    id: 'slab',
    label: 'image sum, slab',
    short: 'slab',
    kind: 'order',
    description: 'images added in a growing slab (normal z)',
    ready: false,
    params: [{ key: 'order.shells', label: 'shells', defaultValue: '8', hint: 'largest slab half-width, in box sides' }],
  },
  {
    id: 'screened',
    label: 'screened image sum',
    short: 'screened',
    kind: 'order',
    description: 'images with a convergence factor e^(−λr); tends to Ewald as λ → 0',
    ready: false,
    params: [{ key: 'order.lambda', label: 'λ', defaultValue: '0.1', hint: 'screening rate (1/length)' }],
  },
  {
    id: 'nearest',
    label: 'nearest image only',
    short: 'nearest',
    kind: 'order',
    description: 'each pair once, at its minimum-image separation',
    ready: false,
    params: [],
  },
  {
    id: 'pme',
    label: 'particle-mesh Ewald',
    short: 'PME',
    kind: 'fast',
    description: 'the fast all-particle Ewald method',
    ready: false,
    params: [],
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
