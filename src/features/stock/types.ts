import type { EmergencyKit, LotView } from '../../../server/features/stock/stock.service';
import type { UsageReport, UsageRow } from '../../../server/features/stock/usage';

export type { EmergencyKit, LotView, UsageReport, UsageRow };
export type { AdjustLotInput, ReceiveLotInput } from '../../../server/features/stock/stock.schemas';

export interface StockProduct {
  id: string;
  name: string;
  kind: 'filler' | 'toxin' | 'hyaluronidase';
  unit: 'mL' | 'U';
  unitLabel: string | null;
  packSize: number | null;
  gtin: string | null;
}

export interface StockMovementView {
  id: string;
  delta: number;
  reason: string;
  treatmentId: string | null;
  episodeId: string | null;
  note: string;
  at: string;
}
