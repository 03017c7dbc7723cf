// The zone lists and labels are the API's own (a dependency-free schema file), so the two cannot drift apart.
import { ZONE_LABELS, ZONES_OF_KIND, type FillerZone, type LineKind, type ProductKind, type ToxinZone, type ZoneKey } from '../../../server/features/treatments/treatments.schemas';

export type { FillerZone, LineKind, ProductKind, ToxinZone, ZoneKey };
export { ZONE_LABELS, ZONES_OF_KIND };

/** Tap steps offered per kind: 0.05–0.2 mL of filler, 0.5–2 U of toxin. */
export const STEPS: Record<LineKind, number[]> = { filler: [0.05, 0.1, 0.2], toxin: [0.5, 1, 2] };
export const DEFAULT_STEP: Record<LineKind, number> = { filler: 0.1, toxin: 1 };
