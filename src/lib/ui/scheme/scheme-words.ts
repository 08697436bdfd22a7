/**
 * The scheme in words: what hovering, focusing or a screen reader says about a tile, an
 * arrow or a reported quantity, and the links into the Build editor. Pure functions.
 */
import type { Driver, ReportedQuantity, SchemeFlow, SchemeGraph, SchemeState } from './scheme-graph';
import type { SeriesSummary } from './sparkline';

/** What can be pointed at in the scheme. */
export type SchemeItem = { kind: 'state' | 'flow' | 'derived'; id: string };

/** `/models/<key>/build#<kind>-<id>`: the field of the Build editor that holds the item. */
export function buildHref(base: string, entryKey: string, kind: 'state' | 'flow' | 'derived' | 'parameter' | 'forcing', id: string): string {
  return `${base}/models/${encodeURIComponent(entryKey)}/build#${kind}-${encodeURIComponent(id)}`;
}

const massFormat = new Intl.NumberFormat('en-GB', { maximumSignificantDigits: 3 });

/** A mass for reading: three significant digits, thousands grouped (`18,700`, `0.251`). */
export function formatMass(value: number): string {
  if (!Number.isFinite(value)) return String(value);
  if (value !== 0 && Math.abs(value) < 1e-3) return value.toExponential(2);
  return massFormat.format(value);
}

/** `kg/yr` for a conserved unit `kg`. */
export function perYear(unit: string): string {
  return unit.includes('/') ? `(${unit})/yr` : `${unit}/yr`;
}

/** The mean annual mass as a phrase, e.g. `5,920 kg P/yr on average`. */
export function massPhrase(mass: number, element: string, unit: string): string {
  const reverse = mass < 0 ? ' (net, against the arrow)' : '';
  return `${formatMass(Math.abs(mass))} ${unit} ${element}/yr on average${reverse}`;
}

function where(flow: SchemeFlow): string {
  if (flow.kind === 'import') return `into ${flow.to} from outside the lake`;
  if (flow.kind === 'export') return `from ${flow.from} out of the lake`;
  return `from ${flow.from} to ${flow.to}`;
}

function driverList(drivers: Driver[]): string {
  if (drivers.length === 0) return 'reads no forcing or parameter';
  const name = (d: Driver) => (d.kind === 'forcing' ? `${d.id} (forcing)` : d.id);
  const direct = drivers.filter((d) => d.direct).map(name);
  const through = drivers.filter((d) => !d.direct).map((d) => `${name(d)} via ${d.via.join(', ')}`);
  const parts: string[] = [];
  if (direct.length) parts.push(`reads ${direct.join(', ')}`);
  if (through.length) parts.push(`${direct.length ? 'and ' : 'reads '}through derived quantities ${through.join('; ')}`);
  return parts.join(' ');
}

/** One line on a flow: where it goes, its rate, what it reads, and its mean annual mass after a run. */
export function describeFlow(flow: SchemeFlow, graph: SchemeGraph, mass?: number): string {
  const basis = flow.from ?? flow.to!;
  const unit = graph.nodes.find((n) => n.id === basis)?.unit;
  const rate = flow.rate.trim() ? `rate ${flow.rate}${unit ? ` (${unit} per day)` : ''}` : 'no rate yet';
  const parts = [
    `Flow ${flow.id}${flow.label ? ` (${flow.label})` : ''} ${where(flow)}`,
    flow.rateProblem ? `${rate}, which cannot be read: ${flow.rateProblem}` : rate,
    driverList(flow.drivers)
  ];
  if (mass !== undefined && graph.conserved) parts.push(massPhrase(mass, graph.conserved.element, graph.conserved.unit));
  return parts.join('; ') + '.';
}

/** One line on a compartment; with `run`, how its value went over the run. */
export function describeState(state: SchemeState, graph: SchemeGraph, run?: SeriesSummary | null): string {
  const zone = graph.zones.find((z) => z.key === state.zone)?.name ?? 'no zone';
  const flows = [...graph.edges, ...graph.boundary];
  const ins = flows.filter((f) => f.to === state.id).map((f) => f.id);
  const outs = flows.filter((f) => f.from === state.id).map((f) => f.id);
  return (
    `Compartment ${state.id}${state.label ? ` (${state.label})` : ''}, zone ${zone}, in ${state.unit || 'no unit'}` +
    `${state.conserved ? '' : ', kept out of the mass inventory'}; ` +
    `in: ${ins.length ? ins.join(', ') : 'none'}; out: ${outs.length ? outs.join(', ') : 'none'}` +
    (run
      ? `; over the run from ${formatMass(run.first)} to ${formatMass(run.last)} ${state.unit}` +
        ` (between ${formatMass(run.min)} and ${formatMass(run.max)})`
      : '') +
    '.'
  );
}

/** One line on a reported quantity. */
export function describeReported(q: ReportedQuantity, value?: { value: number; period: string }): string {
  const v = value ? `; ${value.period}: ${formatMass(value.value)} ${q.unit}` : '';
  return `Reported ${q.id}${q.label ? ` (${q.label})` : ''}, in ${q.unit || 'no unit'} = ${q.expression}${v}.`;
}
