/**
 * Which catalogue item a stored measure stands for. A scenario document does not record
 * the item it was made from (it holds only the generic kinds), so the item is found again
 * from the measure's kind and what it acts on: the first trade item, in catalogue order,
 * whose selectors allow the measure's target. Catch-all items never match: such a
 * measure is "other".
 */
import type { MeasureDoc, ModelDoc } from '$lib/engine/document/types';
import type { Catalogue, CatalogueItem } from './catalogue';
import { itemAllows } from './targets';

export function matchMeasure(measure: MeasureDoc, model: ModelDoc, catalogue: Catalogue): CatalogueItem | 'other' {
  for (const item of catalogue.items) {
    if (item.generic) continue;
    if (itemAllows(item, model, measure)) return item;
  }
  return 'other';
}

/** The catch-all item of a kind (the first generic one), for an "other" measure's defaults and cost unit. */
export function genericItemOf(kind: MeasureDoc['kind'], catalogue: Catalogue): CatalogueItem | undefined {
  return catalogue.items.find((i) => i.generic && i.kind === kind);
}
