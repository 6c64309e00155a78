// Matching a figure's or plot's approach (body + encounter epoch) to an approach of a run's result: the approach
// of the same body nearest in time within FIGURE_MATCH_DAYS (shared/bulletins/document.ts).
import { FIGURE_MATCH_DAYS } from '../../shared/bulletins/document';
import type { AssessmentResult } from '../../shared/schemas/assessment';

export function findApproachIndex(result: AssessmentResult, body: string, epochTdbJd: number): number | null {
  let best: number | null = null;
  let bestDays = Infinity;
  result.approaches.forEach((a, i) => {
    const days = Math.abs(a.epochTdbJd - epochTdbJd);
    if (a.body === body && days <= FIGURE_MATCH_DAYS && days < bestDays) {
      best = i;
      bestDays = days;
    }
  });
  return best;
}
