/**
 * The demo lake and its baseline scenario, bundled into the app (imported, not fetched)
 * so that the first page works offline from the first visit. The lake is invented.
 */
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import model from '../../../static/examples/demo-lake.model.json';
import baseline from '../../../static/examples/demo-lake.baseline.scenario.json';

// The engine validates both documents when it runs them; a bad one comes back as a failed run.
export const demoModel = model as unknown as ModelDoc;
export const demoBaseline = baseline as unknown as ScenarioDoc;
