/** A complete, valid design form as the design editor posts it (integration tests). */
export function designForm(over: Record<string, string> = {}): Record<string, string> {
  return {
    name: 'A design',
    'payoffs.R': '40',
    'payoffs.S': '12',
    'payoffs.T': '50',
    'payoffs.P': '25',
    'labels.C': 'X',
    'labels.D': 'Y',
    delta: '0.75',
    supergames: '10',
    roundSeconds: '20',
    'termination.kind': 'standard',
    'oddCount.kind': 'computer',
    'oddCount.strategy': 'TFT',
    timeout: 'repeat-last',
    'credit.kind': 'participation',
    'credit.credit': '1',
    instructions: '',
    ...over,
  };
}
