import type { ActionView, EpisodeView, FollowUpView, PhotoPair } from '../../../server/features/complications/complications.service';

export type { ActionView, EpisodeView, FollowUpView, PhotoPair };
export type { ActionInput, FollowUpInput, StartEpisodeInput, UpdateEpisodeInput } from '../../../server/features/complications/complications.schemas';
export { ACTION_KINDS, ACTION_LABELS, COMPLICATION_SIGNS, OUTCOME_LABELS, OUTCOMES, SIGN_LABELS } from '../../../server/features/complications/complications.schemas';

export interface EpisodeSummary {
  id: string;
  visitId: string;
  treatmentId: string;
  onsetAt: string;
  signs: string[];
  outcome: string | null;
  startedAt: string;
}

export interface EnzymeProduct {
  id: string;
  name: string;
  kind: string;
  unitLabel: string | null;
  gtin: string | null;
}
