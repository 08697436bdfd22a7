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
import demoHalfLoad from '../../../static/examples/demo-lake.half-load.scenario.json';
import demoFishRemoval from '../../../static/examples/demo-lake.fish-removal.scenario.json';
import demoLoadAndFish from '../../../static/examples/demo-lake.load-and-fish.scenario.json';

// The library validates each example before it stores it (seed and create refuse an invalid one).
/** In the order the library lists them on first start: the demo lake first. */
export const EXAMPLES: readonly ModelDoc[] = [demoLake, oneBox, closedNpzd] as unknown as ModelDoc[];

/** Baseline scenarios shipped for example models, by model id. */
export const EXAMPLE_BASELINES: Readonly<Record<string, ScenarioDoc>> = {
  [demoLake.id]: demoBaseline as unknown as ScenarioDoc
};

/** Every scenario shipped for an example model, by model id, the baseline first. */
export const EXAMPLE_SCENARIOS: Readonly<Record<string, readonly ScenarioDoc[]>> = {
  [demoLake.id]: [demoBaseline, demoHalfLoad, demoFishRemoval, demoLoadAndFish] as unknown as ScenarioDoc[]
};
