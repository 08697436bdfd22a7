import { describe, expect, test } from 'vitest';
import { readFileSync } from 'node:fs';
import { analyzeModel } from '$lib/engine/document/validate-model';
import type { ModelSession } from '../model-session.svelte';
import { BuildView, fieldAttrs, UNDO_BUTTON_ID } from './build-view.svelte';

const demo = JSON.parse(readFileSync(new URL('../../../../static/examples/demo-lake.model.json', import.meta.url), 'utf8'));

/** A session with the real edit semantics (a clone is edited, then becomes the draft), without storage. */
function fakeSession(doc: Record<string, unknown>) {
  const s = {
    doc: structuredClone(doc) as unknown,
    problems: analyzeModel(doc).problems,
    updates: 0,
    update(edit: (d: Record<string, unknown>) => void) {
      const next = structuredClone(s.doc) as Record<string, unknown>;
      edit(next);
      s.doc = next;
      s.updates++;
    }
  };
  return s;
}

describe('fieldAttrs', () => {
  test('fieldAttrs(field, problems) marks errors invalid and points at the messages', () => {
    expect(fieldAttrs('bf-id', [])).toEqual({ id: 'bf-id', 'aria-invalid': undefined, 'aria-describedby': undefined });
    expect(fieldAttrs('bf-id', [{ severity: 'error' }])).toEqual({ id: 'bf-id', 'aria-invalid': 'true', 'aria-describedby': 'bf-id-msg' });
  });
  test('fieldAttrs(field, warnings) describes without marking the field invalid, and keeps a hint', () => {
    expect(fieldAttrs('f', [{ severity: 'warning' }], 'f-cells')).toEqual({ id: 'f', 'aria-invalid': undefined, 'aria-describedby': 'f-msg f-cells' });
  });
});

describe('BuildView', () => {
  test('removeRow removes at once, offers an undo naming the item, and undo puts it back in its place', () => {
    const session = fakeSession(demo);
    const view = new BuildView(session as unknown as ModelSession);
    view.removeRow('flows', 9);
    const flows = () => (session.doc as { flows: { id: string }[] }).flows;
    expect(flows()).toHaveLength(31);
    expect(flows().map((f) => f.id)).not.toContain('phySettle');
    expect(view.notice?.message).toBe('Removed flow phySettle.');
    view.undo();
    expect(flows()).toHaveLength(32);
    expect(flows()[9].id).toBe('phySettle');
    expect(view.notice).toBeNull();
    expect(session.doc).toEqual(demo);
  });

  test('removing a forcing shifts the open table editors after it, and undo shifts them back', () => {
    const session = fakeSession(demo);
    const view = new BuildView(session as unknown as ModelSession);
    view.openTables = { 0: true, 2: true };
    view.removeRow('forcings', 1);
    expect(view.openTables).toEqual({ 0: true, 1: true });
    view.undo();
    expect(view.openTables).toEqual({ 0: true, 2: true });
  });

  test('addRow appends a row with an id no symbol uses', () => {
    const session = fakeSession(demo);
    const view = new BuildView(session as unknown as ModelSession);
    view.addRow('parameters');
    const params = (session.doc as { parameters: { id: string }[] }).parameters;
    expect(params).toHaveLength(71);
    expect(params[70]).toEqual({ id: 'param1', value: 1, unit: '1' });
  });

  test('a newer notice replaces the older one; dismissing keeps the change', () => {
    const session = fakeSession(demo);
    const view = new BuildView(session as unknown as ModelSession);
    view.removeRow('parameters', 0);
    view.removeRow('parameters', 0);
    expect(view.notice?.message).toBe('Removed parameter zMean.');
    view.dismissNotice();
    expect(view.notice).toBeNull();
    expect((session.doc as { parameters: unknown[] }).parameters).toHaveLength(68);
    expect(UNDO_BUTTON_ID).toBe('bt-undo');
  });

  test('replaceWithEmptyList gives a section that is not a list an empty one, and undo brings the old value back', () => {
    const session = fakeSession({ ...demo, derived: 'oops' });
    const view = new BuildView(session as unknown as ModelSession);
    view.replaceWithEmptyList('derived');
    expect((session.doc as { derived: unknown }).derived).toEqual([]);
    view.undo();
    expect((session.doc as { derived: unknown }).derived).toBe('oops');
  });

  test('problemsTextAt(field) is the problems at that control as text, and [] elsewhere', () => {
    const bad = structuredClone(demo);
    bad.parameters[17].value = 'abc';
    const view = new BuildView(fakeSession(bad) as unknown as ModelSession);
    expect(JSON.parse(view.problemsTextAt('bf-parameters-17-value'))).toEqual([
      { severity: 'error', code: 'not_a_number', message: "value must be a finite number, got the text 'abc'" }
    ]);
    expect(view.problemsTextAt('bf-parameters-16-value')).toBe('[]');
  });
});
