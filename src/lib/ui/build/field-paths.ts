/**
 * Where a problem sits on the Build screen: the engine reports a JSON path
 * (`flows[3].rate`, `forcings[0].table.t[4]`), the screen has one control per field. This
 * module names those controls (DOM ids) and maps a path to the nearest control that
 * exists, so that every problem can be shown at its field and jumped to from the summary.
 */

/** The lists of a model document, in the order the Build screen shows them. */
export const SECTIONS = ['parameters', 'forcings', 'states', 'derived', 'flows'] as const;
export type Section = (typeof SECTIONS)[number];

/** One item of a section, in words: `parameter`, `forcing`, … */
export const SECTION_ITEM: Readonly<Record<Section, string>> = {
  parameters: 'parameter',
  forcings: 'forcing',
  states: 'state',
  derived: 'derived quantity',
  flows: 'flow'
};

/** Header fields of the model, each with one control. */
export const HEADER_FIELDS = ['format', 'id', 'title', 'description', 'timeOrigin', 'conserved.element', 'conserved.unit'] as const;

/** The fields each section's row has a control for (`range.min` etc. are nested keys). */
export const ROW_FIELDS: Readonly<Record<Section, readonly string[]>> = {
  parameters: ['id', 'value', 'unit', 'label', 'range.min', 'range.max', 'range.distribution', 'source'],
  forcings: ['id', 'label', 'unit', 'kind', 'expression', 'table', 'interpolation', 'period', 'source'],
  states: ['id', 'label', 'unit', 'initial', 'size', 'zone', 'conserved', 'initialRange.min', 'initialRange.max', 'initialRange.distribution'],
  derived: ['id', 'label', 'expression', 'unit', 'report', 'role'],
  flows: ['id', 'label', 'from', 'to', 'rate', 'role']
};

const PREFIX = 'bf';

function slug(name: string): string {
  return name.replace(/\./g, '-');
}

/** DOM id of a header field's control: `bf-timeOrigin`, `bf-conserved-unit`. */
export function headerFieldId(name: string): string {
  return `${PREFIX}-${slug(name)}`;
}

/** DOM id of a row field's control: `bf-flows-3-rate`, `bf-parameters-0-range-min`. */
export function rowFieldId(section: Section, index: number, name: string): string {
  return `${PREFIX}-${section}-${index}-${slug(name)}`;
}

/** DOM id of a forcing table's cell: `bf-forcings-2-table-t-4`. */
export function tableCellId(forcing: number, column: 't' | 'v', row: number): string {
  return `${PREFIX}-forcings-${forcing}-table-${column}-${row}`;
}

/** DOM id of a section's heading (focusable), for problems about a whole list. */
export function sectionId(section: Section | 'header'): string {
  return `${PREFIX}-section-${section}`;
}

export type PathPart = string | number;

/** `flows[3].rate` → `['flows', 3, 'rate']`; `''` → `[]`. */
export function parsePath(path: string): PathPart[] {
  const parts: PathPart[] = [];
  const re = /([^.[\]]+)|\[(\d+)\]/g;
  let m: RegExpExecArray | null;
  while ((m = re.exec(path)) !== null) parts.push(m[2] !== undefined ? Number(m[2]) : m[1]);
  return parts;
}

/** Where a problem is shown. */
export interface FieldPlace {
  /** DOM id of the control. */
  field: string;
  /** For a table cell: the forcing whose table editor must be open to show it. */
  table?: number;
  /** The control that stands for the field while the table editor is closed. */
  container?: string;
}

function isSection(s: PathPart | undefined): s is Section {
  return typeof s === 'string' && (SECTIONS as readonly string[]).includes(s);
}

const ROW_WHOLE: Readonly<Record<Section, string>> = {
  parameters: 'id',
  forcings: 'kind', // forcing_source: a table or an expression
  states: 'id',
  derived: 'id',
  flows: 'from' // flow_no_end, flow_self, flow_mixed_conservation
};

/** The control that stands for a whole row (a problem at `flows[3]`). */
export function rowWholeField(section: Section, index: number): string {
  return rowFieldId(section, index, ROW_WHOLE[section]);
}

/**
 * The control that shows a problem at `path`, or null for a problem about the document as
 * a whole (it then appears in the summary only). A path below a field the screen has no
 * control for goes to the nearest one above it (an unknown field of a flow → the flow's id).
 */
export function fieldForPath(path: string): FieldPlace | null {
  const parts = parsePath(path);
  if (parts.length === 0) return null;
  const [head, index, key, sub, col] = parts;

  if (!isSection(head)) {
    if (head === 'conserved') {
      return { field: headerFieldId(index === 'unit' ? 'conserved.unit' : 'conserved.element') };
    }
    if (typeof head === 'string' && (HEADER_FIELDS as readonly string[]).includes(head)) return { field: headerFieldId(head) };
    // An unknown field of the document, or one the screen does not edit (notes, version).
    return { field: sectionId('header') };
  }
  if (typeof index !== 'number') return { field: sectionId(head) };
  if (key === undefined) return { field: rowWholeField(head, index) };
  const fields = ROW_FIELDS[head];
  const name = String(key);

  if ((name === 'range' || name === 'initialRange') && fields.includes(`${name}.min`)) {
    const part = sub === 'max' || sub === 'distribution' ? sub : 'min';
    return { field: rowFieldId(head, index, `${name}.${part}`) };
  }
  if (head === 'forcings' && name === 'table') {
    const container = rowFieldId(head, index, 'table');
    if ((sub === 't' || sub === 'v') && typeof col === 'number') {
      return { field: tableCellId(index, sub, col), table: index, container };
    }
    return { field: container };
  }
  if (fields.includes(name)) return { field: rowFieldId(head, index, name) };
  return { field: rowFieldId(head, index, 'id') };
}

const FIELD_WORDS: Readonly<Record<string, string>> = {
  'range.min': 'range minimum',
  'range.max': 'range maximum',
  'range.distribution': 'range distribution',
  range: 'range',
  'initialRange.min': 'initial range minimum',
  'initialRange.max': 'initial range maximum',
  'initialRange.distribution': 'initial range distribution',
  initialRange: 'initial range',
  timeOrigin: 'time origin',
  'conserved.element': 'conserved element',
  'conserved.unit': 'conserved unit',
  conserved: 'conserved',
  from: 'from',
  to: 'to'
};

function itemAt(doc: unknown, section: Section, index: number): Record<string, unknown> | undefined {
  const list = (doc as Record<string, unknown> | null)?.[section];
  if (!Array.isArray(list)) return undefined;
  const item = list[index];
  return typeof item === 'object' && item !== null && !Array.isArray(item) ? (item as Record<string, unknown>) : undefined;
}

/** An item's id as it stands in the draft, or `#4` when it has none that reads as one. */
export function nameOf(item: unknown, index: number): string {
  const id = typeof item === 'object' && item !== null ? (item as Record<string, unknown>).id : undefined;
  return typeof id === 'string' && id.trim() !== '' ? id : `#${index + 1}`;
}

/** The id of the item at `index` of a section of the draft (see `nameOf`). */
export function itemName(doc: unknown, section: Section, index: number): string {
  return nameOf(itemAt(doc, section, index), index);
}

/**
 * A problem's place in words, for the summary: `Flow phySettle, rate`,
 * `Forcing T, table row 5, t`, `Model, time origin`.
 */
export function describePlace(path: string, doc: unknown): string {
  const parts = parsePath(path);
  if (parts.length === 0) return 'Model document';
  const [head, index, key, sub, col] = parts;
  if (!isSection(head)) {
    const name = parts.map(String).join('.');
    return `Model, ${FIELD_WORDS[name] ?? name}`;
  }
  const item = SECTION_ITEM[head];
  if (typeof index !== 'number') return `List of ${head}`;
  const who = `${item[0].toUpperCase()}${item.slice(1)} ${itemName(doc, head, index)}`;
  if (key === undefined) return who;
  if (head === 'forcings' && key === 'table') {
    if ((sub === 't' || sub === 'v') && typeof col === 'number') return `${who}, table row ${col + 1}, ${sub}`;
    return `${who}, table`;
  }
  const name = sub !== undefined && typeof sub === 'string' ? `${key}.${sub}` : String(key);
  return `${who}, ${FIELD_WORDS[name] ?? FIELD_WORDS[String(key)] ?? name}`;
}

const HASH_KINDS: Readonly<Record<string, { section: Section; field: string }>> = {
  parameter: { section: 'parameters', field: 'value' },
  forcing: { section: 'forcings', field: 'id' },
  state: { section: 'states', field: 'id' },
  derived: { section: 'derived', field: 'expression' },
  flow: { section: 'flows', field: 'rate' }
};

/**
 * The control a link from another screen opens: `#flow-phyUptake` → the rate of that
 * flow, `#state-DIP` → its id, `#parameter-kDIP` → its value (the Scheme screen's links).
 * Null when the hash names nothing in the draft.
 */
export function hashTarget(hash: string, doc: unknown): string | null {
  const m = /^#?(parameter|forcing|state|derived|flow)-([A-Za-z_][A-Za-z0-9_]*)$/.exec(hash);
  if (!m || typeof doc !== 'object' || doc === null) return null;
  const { section, field } = HASH_KINDS[m[1]];
  const list = (doc as Record<string, unknown>)[section];
  if (!Array.isArray(list)) return null;
  const index = list.findIndex((x) => typeof x === 'object' && x !== null && (x as { id?: unknown }).id === m[2]);
  return index < 0 ? null : rowFieldId(section, index, field);
}
