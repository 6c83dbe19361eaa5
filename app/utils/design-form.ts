// Form fields of the design editor ↔ the design schema (app/lib/design.ts). Shared by the
// action (server) and the live theory panel (browser). Field names are the schema's paths, so
// zod's issue paths land beside the right inputs.
import { DEFAULT_COMPUTER_STRATEGY, type DesignInput } from '#app/lib/design';
import { type FormSource, formNumber, formText } from '#app/utils/forms';

type Source = FormSource;
const get = formText;
const num = formNumber;

export function designInputFromForm(f: Source): DesignInput {
  const termination =
    get(f, 'termination.kind') === 'block'
      ? { kind: 'block' as const, k: num(f, 'termination.k') as number }
      : { kind: 'standard' as const };
  const oddCount =
    get(f, 'oddCount.kind') === 'sit-out'
      ? { kind: 'sit-out' as const }
      : { kind: 'computer' as const, strategy: get(f, 'oddCount.strategy') ?? DEFAULT_COMPUTER_STRATEGY };
  const credit =
    get(f, 'credit.kind') === 'paid'
      ? {
          kind: 'paid' as const,
          showUpFee: num(f, 'credit.showUpFee') as number,
          ratePerPoint: num(f, 'credit.ratePerPoint') as number,
          currency: (get(f, 'credit.currency') ?? '').toUpperCase(),
          rounding: num(f, 'credit.rounding'),
        }
      : { kind: 'participation' as const, credit: num(f, 'credit.credit') as number, pointsScaleMax: num(f, 'credit.pointsScaleMax') };
  return {
    payoffs: {
      R: num(f, 'payoffs.R') as number,
      S: num(f, 'payoffs.S') as number,
      T: num(f, 'payoffs.T') as number,
      P: num(f, 'payoffs.P') as number,
    },
    labels: { C: get(f, 'labels.C') ?? '', D: get(f, 'labels.D') ?? '' },
    delta: num(f, 'delta') as number,
    supergames: num(f, 'supergames') as number,
    roundSeconds: num(f, 'roundSeconds') as number,
    termination,
    matching: 'random-rematch',
    oddCount,
    timeout: (get(f, 'timeout') ?? 'repeat-last') as DesignInput['timeout'],
    credit,
    consent: f.get('consent') === 'on',
    comprehension: f.get('comprehension') === 'on',
    practice: f.get('practice') === 'on',
    instructions: get(f, 'instructions') ?? '',
  };
}
