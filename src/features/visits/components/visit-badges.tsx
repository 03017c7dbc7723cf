import { Badge } from '../../../components/ui/badge';
import { KIND_LABEL, STATUS_LABEL, type VisitKind, type VisitStatus } from '../types';

const STATUS_TONE = { booked: 'neutral', 'in-progress': 'accent', completed: 'done', cancelled: 'danger' } as const;

export const KindBadge = ({ kind }: { kind: VisitKind }) => <Badge>{KIND_LABEL[kind]}</Badge>;
export const StatusBadge = ({ status }: { status: VisitStatus }) => <Badge tone={STATUS_TONE[status]}>{STATUS_LABEL[status]}</Badge>;
