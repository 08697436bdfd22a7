/**
 * The annual budget of a run grouped the way a lake modeller reads it, from the run's
 * per-year books (closure/closure.ts) and the flows' `role` and ends.
 *
 * Every flow is first placed by where it crosses: an *import* (no `from`), an *export*
 * (no `to`), *internal* (both ends), or *not booked* (between states kept out of the mass
 * inventory). Measures are placed by kind: `add` is an import, `remove` an export,
 * `transfer` internal, each as the engine books them. Lines, in order:
 *   imports   External load (role `externalLoad`), then other import roles, Added by measures
 *   exports   Outflow (role `outflow`), then other export roles, Removed by measures
 *   sediment  Sedimentation (gross), Resuspension, Net sedimentation = sedimentation −
 *             resuspension (a derived line, not added to anything), Sediment release,
 *             Burial, Moved by measures (transfers) — internal flows with those roles
 *   internal  every other internal role (uptake, grazing, mortality, …), one line each
 * A flow with one of the sediment roles that crosses the boundary (burial with no `to`)
 * is an export line of that role instead. Masses are in the conserved unit; a flow moving
 * mass against its direction (a negative rate) counts negatively.
 * Each year: imported − exported = storage change − residual (residual as the engine
 * defines it: storage change minus net import), and the import lines add up to imported,
 * the export lines to exported.
 */
import type { BudgetYearDoc, MeasureDoc, ModelDoc, RunDoc, ScenarioDoc } from '../document/types';

export type Crossing = 'import' | 'export' | 'internal';
export type LineGroup = 'imports' | 'exports' | 'sediment' | 'internal';

export interface BudgetLine {
  /** Stable key: `import:externalLoad`, `export:outflow`, `sediment:netSedimentation`, `internal:uptake`, `measures:removed`, … */
  key: string;
  label: string;
  group: LineGroup;
  crossing: Crossing;
  /** The flow role the line gathers, or null (measures, derived lines). */
  role: string | null;
  flows: string[];
  measures: string[];
  /** True for a line computed from others (net sedimentation); it is not part of any sum. */
  derived: boolean;
  /** Mass per year, in the order of `years`. */
  perYear: number[];
  total: number;
}

export interface RoleBudget {
  unit: string;
  element: string;
  years: { year: number; from: string; to: string }[];
  lines: BudgetLine[];
  /** Flows between non-conserved states: moved no conserved mass, not in the budget. */
  notBooked: string[];
  imported: number[];
  exported: number[];
  storageChange: number[];
  residual: number[];
  totals: { imported: number; exported: number; storageChange: number; residual: number };
}

/** Words for the roles the documents name; any other role is shown as written. */
export const ROLE_WORDS: Readonly<Record<string, string>> = Object.freeze({
  externalLoad: 'External load',
  outflow: 'Outflow',
  sedimentation: 'Sedimentation (gross)',
  resuspension: 'Resuspension',
  release: 'Sediment release',
  burial: 'Burial',
  uptake: 'Uptake',
  excretion: 'Excretion',
  mortality: 'Mortality',
  grazing: 'Grazing',
  predation: 'Predation',
  mineralisation: 'Mineralisation'
});

const SEDIMENT_ROLES = ['sedimentation', 'resuspension', 'release', 'burial'] as const;
const NO_ROLE = '(no role)';

const words = (role: string) => ROLE_WORDS[role] ?? role;

/** Neumaier's compensated sum (Neumaier 1974, ZAMM 54: 39–51), as budgets should use. */
export function compensatedSum(values: readonly number[]): number {
  let s = 0;
  let c = 0;
  for (const v of values) {
    const t = s + v;
    c += Math.abs(s) >= Math.abs(v) ? s - t + v : v - t + s;
    s = t;
  }
  return s + c;
}

function measureKinds(scenario: Pick<ScenarioDoc, 'measures'> | null | undefined): Map<string, MeasureDoc['kind']> {
  const out = new Map<string, MeasureDoc['kind']>();
  (scenario?.measures ?? []).forEach((m, i) => out.set(m.id ?? `m${i + 1}`, m.kind));
  return out;
}

/**
 * The budget of `run` by role. `scenario` tells the kind of each measure; without it a
 * measure whose kind is unknown is taken as internal (a transfer), which keeps the
 * import and export lines exact only when the scenario had no `add` or `remove`.
 */
export function budgetByRole(run: Pick<RunDoc, 'budget' | 'closure'>, model: ModelDoc, scenario?: Pick<ScenarioDoc, 'measures'> | null): RoleBudget {
  const conserved = new Map(model.states.map((s) => [s.id, s.conserved !== false]));
  const kinds = measureKinds(scenario);
  const books: BudgetYearDoc[] = run.budget ?? [];
  const years = books.map((b) => ({ year: b.year, from: b.from, to: b.to }));
  const notBooked: string[] = [];

  const lines = new Map<string, BudgetLine>();
  const line = (key: string, label: string, group: LineGroup, crossing: Crossing, role: string | null): BudgetLine => {
    let l = lines.get(key);
    if (!l) {
      l = { key, label, group, crossing, role, flows: [], measures: [], derived: false, perYear: [], total: 0 };
      lines.set(key, l);
    }
    return l;
  };

  // The fixed lines come first so the table reads the same for every model.
  line('import:externalLoad', words('externalLoad'), 'imports', 'import', 'externalLoad');
  line('export:outflow', words('outflow'), 'exports', 'export', 'outflow');

  for (const f of model.flows) {
    const basis = f.from ?? f.to;
    if (basis !== undefined && conserved.get(basis) === false) {
      notBooked.push(f.id);
      continue;
    }
    const role = f.role ?? NO_ROLE;
    if (!f.from) line(`import:${role}`, words(role), 'imports', 'import', role).flows.push(f.id);
    else if (!f.to) line(`export:${role}`, words(role), 'exports', 'export', role).flows.push(f.id);
    else if ((SEDIMENT_ROLES as readonly string[]).includes(role)) line(`sediment:${role}`, words(role), 'sediment', 'internal', role).flows.push(f.id);
    else line(`internal:${role}`, words(role), 'internal', 'internal', role).flows.push(f.id);
  }
  for (const [id, kind] of kinds) {
    if (kind === 'add') line('measures:added', 'Added by measures', 'imports', 'import', null).measures.push(id);
    else if (kind === 'remove') line('measures:removed', 'Removed by measures', 'exports', 'export', null).measures.push(id);
    else if (kind === 'transfer') line('measures:moved', 'Moved by measures (transfers)', 'sediment', 'internal', null).measures.push(id);
  }
  // Measures the books name that the scenario does not (or no scenario given): internal.
  for (const b of books) {
    for (const id of Object.keys(b.measures)) {
      if (!kinds.has(id)) {
        kinds.set(id, 'transfer');
        line('measures:moved', 'Moved by measures (transfers)', 'sediment', 'internal', null).measures.push(id);
      }
    }
  }

  for (const l of lines.values()) {
    l.perYear = books.map((b) => compensatedSum([...l.flows.map((id) => b.flows[id] ?? 0), ...l.measures.map((id) => b.measures[id] ?? 0)]));
    l.total = compensatedSum(l.perYear);
  }

  const sed = lines.get('sediment:sedimentation');
  const res = lines.get('sediment:resuspension');
  if (sed || res) {
    const perYear = books.map((_, i) => (sed?.perYear[i] ?? 0) - (res?.perYear[i] ?? 0));
    lines.set('sediment:netSedimentation', {
      key: 'sediment:netSedimentation',
      label: 'Net sedimentation (sedimentation − resuspension)',
      group: 'sediment',
      crossing: 'internal',
      role: null,
      flows: [...(sed?.flows ?? []), ...(res?.flows ?? [])],
      measures: [],
      derived: true,
      perYear,
      total: compensatedSum(perYear)
    });
  }

  const order: Record<LineGroup, number> = { imports: 0, exports: 1, sediment: 2, internal: 3 };
  const sedimentOrder = ['sediment:sedimentation', 'sediment:resuspension', 'sediment:netSedimentation', 'sediment:release', 'sediment:burial', 'measures:moved'];
  const rank = (l: BudgetLine) => {
    if (l.key === 'import:externalLoad' || l.key === 'export:outflow') return -2;
    if (l.key.startsWith('measures:') && l.group !== 'sediment') return 1;
    if (l.group === 'sediment') return sedimentOrder.indexOf(l.key);
    return 0;
  };
  const all = [...lines.values()]
    // the two fixed lines stay even when empty; others only when they gather something
    .filter((l) => l.flows.length || l.measures.length || l.key === 'import:externalLoad' || l.key === 'export:outflow')
    .sort((a, b) => order[a.group] - order[b.group] || rank(a) - rank(b) || (a.label < b.label ? -1 : a.label > b.label ? 1 : 0));

  const imported = books.map((b) => b.imported);
  const exported = books.map((b) => b.exported);
  const storageChange = books.map((b) => b.storageChange);
  const residual = books.map((b) => b.residual);
  return {
    unit: run.closure?.unit ?? model.conserved.unit,
    element: model.conserved.element,
    years,
    lines: all,
    notBooked,
    imported,
    exported,
    storageChange,
    residual,
    totals: {
      imported: compensatedSum(imported),
      exported: compensatedSum(exported),
      storageChange: compensatedSum(storageChange),
      residual: compensatedSum(residual)
    }
  };
}
