/**
 * What the Build screen's parts share: the model session, the draft's problems indexed by
 * control, which forcing tables are open, and the notice that offers to undo the last
 * removal. The parts read it from context (`getBuildView()`).
 */
import { getContext, setContext, tick } from 'svelte';
import type { Problem } from '$lib/engine/document/types';
import type { ModelSession } from '../model-session.svelte';
import { itemName, rowFieldId, SECTION_ITEM, sectionId, type FieldPlace, type Section } from './field-paths';
import { indexProblems } from './problem-index';
import { addItem, insertItem, itemOf, removeField, removeItem, restoreField, type Doc, type Item } from './edits';

/** DOM id of the notice's Undo button (focus goes there after a removal). */
export const UNDO_BUTTON_ID = 'bt-undo';

const KEY = Symbol('build-view');

export interface UndoNotice {
  /** "Removed flow phySettle." */
  message: string;
  undo: () => void;
  /** Where focus goes after undo (and after dismissal, unless `dismissFocus`). */
  returnFocus?: string;
  dismissFocus?: string;
  /** Changes with every notice, so a new one is announced. */
  serial: number;
}

const NO_PROBLEMS: readonly Problem[] = Object.freeze([]);

/** The part of a problem a control shows, as text: equal text means nothing to redraw. */
function problemsText(list: readonly Problem[] | undefined): string {
  return list && list.length > 0 ? JSON.stringify(list.map((p) => ({ severity: p.severity, code: p.code, message: p.message }))) : '[]';
}

export type FieldAttrs = { id: string; 'aria-invalid': 'true' | undefined; 'aria-describedby': string | undefined };

/** `id`, `aria-invalid` and `aria-describedby` for a control with these problems. */
export function fieldAttrs(field: string, problems: readonly Pick<Problem, 'severity'>[], hint?: string): FieldAttrs {
  const described = [problems.length > 0 ? `${field}-msg` : '', hint ?? ''].filter(Boolean).join(' ');
  return {
    id: field,
    'aria-invalid': problems.some((p) => p.severity === 'error') ? 'true' : undefined,
    'aria-describedby': described || undefined
  };
}

/**
 * One control's problems. The draft is a fresh copy after every edit, so everything that
 * reads it is recomputed; the control's problems pass through their text, and the control
 * is redrawn only when that text changes (a keystroke elsewhere redraws nothing here).
 */
export class FieldProblems {
  readonly #view: BuildView;
  readonly #field: () => string;
  readonly #hint: () => string | undefined;
  #text = $derived.by(() => this.#view.problemsTextAt(this.#field()));
  problems = $derived.by(() => JSON.parse(this.#text) as Pick<Problem, 'severity' | 'code' | 'message'>[]);
  attrs = $derived.by(() => fieldAttrs(this.#field(), this.problems, this.#hint()));

  constructor(view: BuildView, field: () => string, hint: () => string | undefined = () => undefined) {
    this.#view = view;
    this.#field = field;
    this.#hint = hint;
  }
}

export class BuildView {
  readonly session: ModelSession;
  index = $derived.by(() => indexProblems(this.session.problems, this.session.doc));
  /** Forcings (by index) whose table editor is open. */
  openTables = $state<Record<number, boolean>>({});
  notice = $state<UndoNotice | null>(null);
  #serial = 0;

  constructor(session: ModelSession) {
    this.session = session;
  }

  /** The problems at a control, as text (see FieldProblems). */
  problemsTextAt(field: string): string {
    return problemsText(this.index.byField.get(field));
  }

  /** The problems inside a forcing table, as text, by the control that stands for the table. */
  problemsTextInside(container: string): string {
    return problemsText(this.index.byContainer.get(container));
  }

  /** Call while a component initialises: the problems of one of its controls. */
  field(field: () => string, hint?: () => string | undefined): FieldProblems {
    return new FieldProblems(this, field, hint);
  }

  /** Edits the draft (saved by the session after a short pause). */
  edit(change: (doc: Doc) => void): void {
    this.session.update(change);
  }

  /** Edits one row of a section, if it is an object. */
  editItem(section: Section, index: number, change: (item: Item, doc: Doc) => void): void {
    this.session.update((doc) => {
      const item = itemOf(doc, section, index);
      if (item) change(item, doc);
    });
  }

  /** Adds a row to the section and focuses its id. */
  addRow(section: Section): void {
    let at = -1;
    this.edit((doc) => {
      at = addItem(doc, section);
    });
    if (at >= 0) void this.focusId(rowFieldId(section, at, 'id'));
  }

  /** Removes a row at once and offers to undo it. */
  removeRow(section: Section, index: number): void {
    const name = itemName(this.session.doc, section, index);
    let removed: unknown;
    this.edit((doc) => {
      removed = removeItem(doc, section, index);
    });
    if (removed === undefined) return;
    if (section === 'forcings') this.openTables = shiftOpen(this.openTables, index, -1);
    this.offerUndo(
      `Removed ${SECTION_ITEM[section]} ${name}.`,
      () => {
        this.edit((doc) => void insertItem(doc, section, index, removed));
        if (section === 'forcings') this.openTables = shiftOpen(this.openTables, index, 1);
      },
      rowFieldId(section, index, 'id'),
      sectionId(section)
    );
  }

  /** Removes a field the engine does not know (an `unknown_field` warning), undoably. */
  removeUnknownField(path: string): void {
    let removed: { value: unknown } | undefined;
    this.edit((doc) => {
      removed = removeField(doc, path);
    });
    if (!removed) return;
    const value = removed.value;
    this.offerUndo(`Removed the unknown field ${path}.`, () => this.edit((doc) => void restoreField(doc, path, value)), 'bt-problems-h');
  }

  /** Replaces a section that is not a list (a hand-edited file) with an empty one, undoably. */
  replaceWithEmptyList(section: Section): void {
    let old: unknown;
    this.edit((doc) => {
      old = doc[section];
      doc[section] = [];
    });
    this.offerUndo(
      `Replaced the ${section} of the draft (not a list) with an empty list.`,
      () => this.edit((doc) => void (doc[section] = old)),
      sectionId(section)
    );
  }

  /** Offers to undo a removal; the newest notice replaces an older one. */
  offerUndo(message: string, undo: () => void, returnFocus?: string, dismissFocus?: string, moveFocus = true): void {
    this.notice = { message, undo, returnFocus, dismissFocus, serial: ++this.#serial };
    // A removal takes focus to Undo; a change made in a select (kind of forcing) keeps it.
    if (moveFocus) void this.focusId(UNDO_BUTTON_ID);
  }

  dismissNotice(): void {
    const back = this.notice?.dismissFocus ?? this.notice?.returnFocus;
    this.notice = null;
    if (back) void this.focusId(back);
  }

  undo(): void {
    const n = this.notice;
    if (!n) return;
    this.notice = null;
    n.undo();
    if (n.returnFocus) void this.focusId(n.returnFocus);
  }

  /** Focuses a control, opening the forcing table it sits in first. */
  async focus(place: FieldPlace): Promise<void> {
    if (place.table !== undefined && !this.openTables[place.table]) {
      this.openTables[place.table] = true;
    }
    await this.focusId(place.field, place.container);
  }

  async focusId(id: string, fallback?: string): Promise<void> {
    await tick();
    if (typeof document === 'undefined') return;
    const el = document.getElementById(id) ?? (fallback ? document.getElementById(fallback) : null);
    if (!el) return;
    el.focus({ preventScroll: true });
    // A heading inside a sticky bar reports where it is stuck, not where its section starts.
    const sticky = el.closest('.bt-head');
    if (sticky) (sticky.closest('section') ?? sticky).scrollIntoView({ block: 'start', behavior: 'auto' });
    else el.scrollIntoView({ block: 'center', behavior: 'auto' });
  }
}

/** Open table editors after a forcing was removed (-1) or put back (+1) at `index`. */
function shiftOpen(open: Record<number, boolean>, index: number, by: -1 | 1): Record<number, boolean> {
  const out: Record<number, boolean> = {};
  for (const [k, v] of Object.entries(open)) {
    const i = Number(k);
    if (by === -1 && i === index) continue;
    out[i > index || (by === 1 && i === index) ? i + by : i] = v;
  }
  return out;
}

export function setBuildView(view: BuildView): BuildView {
  return setContext(KEY, view);
}

export function getBuildView(): BuildView {
  const v = getContext<BuildView | undefined>(KEY);
  if (!v) throw new Error('getBuildView() outside the Build screen');
  return v;
}
