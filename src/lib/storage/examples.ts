/**
 * The example models shipped with the app, bundled (imported, not fetched) so that a first
 * start offline still has them. All their lakes are invented (static/examples/README.md).
 * The demo lake's baseline scenario comes with them: the Runs screen runs it for a model
 * with the demo's id.
 */
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import demoLake from '../../../static/examples/demo-lake.model.json';
import oneBox from '../../../static/examples/one-box.model.json';
import closedNpzd from '../../../static/examples/closed-npzd.model.json';
import demoBaseline from '../../../static/examples/demo-lake.baseline.scenario.json';

// The library validates each example before it stores it (seed and create refuse an invalid one).
/** In the order the library lists them on first start: the demo lake first. */
export const EXAMPLES: readonly ModelDoc[] = [demoLake, oneBox, closedNpzd] as unknown as ModelDoc[];

/** Baseline scenarios shipped for example models, by model id. */
export const EXAMPLE_BASELINES: Readonly<Record<string, ScenarioDoc>> = {
  [demoLake.id]: demoBaseline as unknown as ScenarioDoc
};
