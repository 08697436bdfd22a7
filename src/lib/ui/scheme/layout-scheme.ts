/**
 * The scheme's geometry, laid out by elkjs (layered, with the lake as the outer compound
 * node, one compound node per zone inside it, and one port per flow end so that parallel
 * flows keep apart). Boundary flows run to ports on the lake's frame; the short stub that
 * continues them outside the frame is added here. Everything is in one coordinate system
 * (ELK's `json.shapeCoords`/`json.edgeCoords` set to ROOT), in px at zoom 1.
 */
import ELK from 'elkjs/lib/elk.bundled.js';
import type { ElkExtendedEdge, ElkNode, ElkPort, LayoutOptions } from 'elkjs/lib/elk-api';
import { drawnFlows, type SchemeFlow, type SchemeGraph } from './scheme-graph';
import { flowLabel, tileContent, SCHEME_METRICS, type FlowLabelContent, type TileContent } from './scheme-sizes';
import { textWidth } from './text-metrics';

export interface Point {
  x: number;
  y: number;
}
export interface Box {
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface TileGeometry extends Box {
  id: string;
  zone: string;
  content: TileContent;
}

export interface GroupGeometry extends Box {
  key: string;
  name: string;
}

export interface FlowGeometry {
  id: string;
  kind: SchemeFlow['kind'];
  /** The route from where the flow leaves to where it arrives (orthogonal polyline). */
  points: Point[];
  /** Where a boundary flow crosses the frame; absent for internal flows. */
  crossing?: Point;
  label: Box & { content: FlowLabelContent };
}

export interface SchemeLayout {
  width: number;
  height: number;
  direction: LayoutDirection;
  /** The lake's frame. */
  frame: Box;
  /** The frame's caption (conserved element and unit), at its top left inside. */
  caption: { text: string; x: number; y: number };
  groups: GroupGeometry[];
  tiles: TileGeometry[];
  flows: FlowGeometry[];
}

export type LayoutDirection = 'RIGHT' | 'DOWN';

export interface LayoutSchemeOptions {
  /** Main direction of the layers: `DOWN` (default; sediment tends to sink to the bottom) or `RIGHT`. */
  direction?: LayoutDirection;
  /** ELK options laid over the defaults (for trials; the defaults are what the app uses). */
  elkOptions?: LayoutOptions;
}

/** Layout constants (px). */
export const LAYOUT_DEFAULTS = Object.freeze({
  /** Length of a boundary flow's stub outside the frame. */
  stub: 44,
  /** Margin around the frame, beyond the stubs. */
  margin: 12,
  captionFont: 13,
  groupFont: 12,
  /** Room between flows running side by side: more than the widest arrow (FLOW_WIDTHS.max). */
  edgeEdge: 11,
  edgeNode: 12,
  nodeNode: 20,
  betweenLayers: 24
});

const D = LAYOUT_DEFAULTS;
const FRAME = 'lake';

const id = {
  zone: (key: string) => `zone:${key}`,
  port: (flow: string, end: 'out' | 'in') => `port:${flow}:${end}`
};

/** The frame's caption, e.g. `Lake boundary · P in kg`. */
export function frameCaption(graph: SchemeGraph): string {
  return graph.conserved ? `Lake boundary · ${graph.conserved.element} in ${graph.conserved.unit}` : 'Lake boundary';
}

/** Builds the ELK graph for `graph` (exported for tests and for reading). */
export function elkGraph(graph: SchemeGraph, direction: LayoutDirection = 'DOWN', extra: LayoutOptions = {}): ElkNode {
  const flows = drawnFlows(graph);
  const zoneName = new Map(graph.zones.map((z) => [z.key, z.name]));
  const portsOf = new Map<string, ElkPort[]>();
  for (const f of flows) {
    if (f.from) push(portsOf, f.from, { id: id.port(f.id, 'out'), width: 2, height: 2 });
    if (f.to) push(portsOf, f.to, { id: id.port(f.id, 'in'), width: 2, height: 2 });
  }
  const [importSide, exportSide] = direction === 'RIGHT' ? ['WEST', 'EAST'] : ['NORTH', 'SOUTH'];
  const framePorts: ElkPort[] = graph.boundary.map((f) => ({
    id: id.port(f.id, f.kind === 'import' ? 'out' : 'in'),
    width: 2,
    height: 2,
    layoutOptions: { 'elk.port.side': f.kind === 'import' ? importSide : exportSide }
  }));

  // ELK reads these per compound node (each lays out its own children), so every level gets
  // them. `considerModelOrder` is left out: elkjs 0.12 fails on it inside nested compounds.
  const layered: LayoutOptions = {
    'elk.algorithm': 'layered',
    'elk.direction': direction,
    'elk.edgeRouting': 'ORTHOGONAL',
    'elk.hierarchyHandling': 'INCLUDE_CHILDREN',
    'elk.edgeLabels.placement': 'CENTER',
    'elk.spacing.nodeNode': String(D.nodeNode),
    'elk.layered.spacing.nodeNodeBetweenLayers': String(D.betweenLayers),
    'elk.spacing.edgeEdge': String(D.edgeEdge),
    'elk.layered.spacing.edgeEdgeBetweenLayers': String(D.edgeEdge),
    'elk.spacing.edgeNode': String(D.edgeNode),
    'elk.layered.spacing.edgeNodeBetweenLayers': String(D.edgeNode),
    'elk.spacing.edgeLabel': '3',
    'elk.spacing.portPort': '10',
    'elk.layered.nodePlacement.strategy': 'NETWORK_SIMPLEX',
    'elk.layered.compaction.postCompaction.strategy': 'EDGE_LENGTH',
    // More sweeps of crossing minimisation than the default 7: fewer crossings on the demo lake.
    'elk.layered.thoroughness': '40',
    'elk.randomSeed': '1',
    ...extra
  };

  const caption = frameCaption(graph);
  const zones: ElkNode[] = graph.zones.map((z) => ({
    id: id.zone(z.key),
    labels: [{ text: z.name, width: Math.ceil(textWidth(z.name, D.groupFont, true)) + 4, height: 16 }],
    layoutOptions: {
      ...layered,
      'elk.padding': '[top=30,left=14,bottom=14,right=14]',
      'elk.nodeLabels.placement': '[H_LEFT, V_TOP, INSIDE]'
    },
    children: z.states.map((sid) => {
      const s = graph.nodes.find((n) => n.id === sid)!;
      const c = tileContent(s, zoneName.get(s.zone) ?? '');
      return {
        id: sid,
        width: c.width,
        height: c.height,
        ports: portsOf.get(sid) ?? [],
        layoutOptions: { 'elk.portConstraints': 'FREE' }
      };
    })
  }));

  // Inline labels sit on their arrow (the arrow runs into the label box and out of it).
  const labelOptions: LayoutOptions = { 'elk.edgeLabels.inline': 'true' };
  const edges: ElkExtendedEdge[] = flows.map((f) => {
    const l = flowLabel(f, SCHEME_METRICS.labelShape[direction]);
    return {
      id: f.id,
      // An import leaves from its port on the frame, an export arrives at one.
      sources: [id.port(f.id, 'out')],
      targets: [id.port(f.id, 'in')],
      labels: [{ id: `label:${f.id}`, text: f.id, width: l.width, height: l.height, layoutOptions: labelOptions }]
    };
  });

  return {
    id: 'root',
    layoutOptions: {
      ...layered,
      'elk.padding': `[top=${D.margin},left=${D.stub + D.margin},bottom=${D.margin},right=${D.stub + D.margin}]`,
      'elk.json.shapeCoords': 'ROOT',
      'elk.json.edgeCoords': 'ROOT'
    },
    children: [
      {
        id: FRAME,
        labels: [{ text: caption, width: Math.ceil(textWidth(caption, D.captionFont, true)) + 4, height: 18 }],
        ports: framePorts,
        layoutOptions: {
          ...layered,
          'elk.portConstraints': 'FIXED_SIDE',
          'elk.padding': '[top=40,left=28,bottom=24,right=28]',
          'elk.nodeLabels.placement': '[H_LEFT, V_TOP, INSIDE]'
        },
        children: zones,
        edges
      }
    ]
  };
}

function push<K, V>(map: Map<K, V[]>, key: K, value: V) {
  const l = map.get(key);
  if (l) l.push(value);
  else map.set(key, [value]);
}

let elk: InstanceType<typeof ELK> | null = null;

/** Lays the scheme out. Resolves with every tile, group, route and label placed. */
export async function layoutScheme(graph: SchemeGraph, options: LayoutSchemeOptions = {}): Promise<SchemeLayout> {
  const direction = options.direction ?? 'DOWN';
  elk ??= new ELK();
  const laid = await elk.layout(elkGraph(graph, direction, options.elkOptions));
  return readLayout(graph, laid, direction);
}

function box(n: { x?: number; y?: number; width?: number; height?: number }): Box {
  return { x: n.x ?? 0, y: n.y ?? 0, width: n.width ?? 0, height: n.height ?? 0 };
}

function readLayout(graph: SchemeGraph, root: ElkNode, direction: LayoutDirection): SchemeLayout {
  const lake = root.children!.find((c) => c.id === FRAME)!;
  const frame = box(lake);
  const zoneName = new Map(graph.zones.map((z) => [z.key, z.name]));
  const groups: GroupGeometry[] = [];
  const tiles: TileGeometry[] = [];
  for (const z of lake.children ?? []) {
    const key = z.id.slice('zone:'.length);
    groups.push({ key, name: zoneName.get(key) ?? key, ...box(z) });
    for (const n of z.children ?? []) {
      const s = graph.nodes.find((x) => x.id === n.id)!;
      tiles.push({ id: n.id, zone: key, content: tileContent(s, zoneName.get(key) ?? ''), ...box(n) });
    }
  }

  const byId = new Map(drawnFlows(graph).map((f) => [f.id, f]));
  const flows: FlowGeometry[] = [];
  for (const e of lake.edges ?? []) {
    const f = byId.get(e.id)!;
    const sections = (e as ElkExtendedEdge).sections ?? [];
    const points: Point[] = [];
    for (const s of sections) {
      for (const p of [s.startPoint, ...(s.bendPoints ?? []), s.endPoint]) {
        const last = points[points.length - 1];
        if (!last || last.x !== p.x || last.y !== p.y) points.push({ x: p.x, y: p.y });
      }
    }
    let crossing: Point | undefined;
    if (f.kind !== 'internal' && points.length > 0) {
      // Continue the route straight out through the frame, away from the lake.
      // The port sits just outside the frame's line; the crossing is put on the line itself.
      const end = f.kind === 'import' ? 0 : points.length - 1;
      const outward = outwardOf(points[end], frame);
      const at =
        outward.x !== 0
          ? { x: outward.x < 0 ? frame.x : frame.x + frame.width, y: points[end].y }
          : { x: points[end].x, y: outward.y < 0 ? frame.y : frame.y + frame.height };
      points[end] = at;
      crossing = { ...at };
      const outside = { x: at.x + outward.x * D.stub, y: at.y + outward.y * D.stub };
      if (f.kind === 'import') points.unshift(outside);
      else points.push(outside);
    }
    const l = e.labels?.[0];
    flows.push({ id: f.id, kind: f.kind, points, crossing, label: { ...box(l ?? {}), content: flowLabel(f, SCHEME_METRICS.labelShape[direction]) } });
  }

  const captionLabel = lake.labels?.[0];
  return {
    width: Math.ceil(root.width ?? 0),
    height: Math.ceil(root.height ?? 0),
    direction,
    frame,
    caption: { text: frameCaption(graph), x: captionLabel?.x ?? frame.x + 12, y: captionLabel?.y ?? frame.y + 8 },
    groups,
    tiles,
    flows
  };
}

/** The unit vector pointing out of `frame` at a point on its border. */
function outwardOf(p: Point, frame: Box): Point {
  const d = [
    { v: { x: -1, y: 0 }, dist: Math.abs(p.x - frame.x) },
    { v: { x: 1, y: 0 }, dist: Math.abs(p.x - (frame.x + frame.width)) },
    { v: { x: 0, y: -1 }, dist: Math.abs(p.y - frame.y) },
    { v: { x: 0, y: 1 }, dist: Math.abs(p.y - (frame.y + frame.height)) }
  ];
  d.sort((a, b) => a.dist - b.dist);
  return d[0].v;
}
