/** The cautions Parley shows staff (product.md "Cautions the product shows"). */
export function Cautions({ compact = false }: { compact?: boolean }) {
  const items = [
    [
      'Research use',
      'Using classroom data for research needs your institution’s ethics-board approval and the participants’ informed consent. Parley offers a consent page and records consent; the decision is your institution’s.',
    ],
    [
      'Personal data',
      'Exports are de-identified by default. Identified exports carry personal data under your institution’s privacy rules.',
    ],
    [
      'No deception',
      'Computer partners are always disclosed to the participant who plays them, and the announced δ is the true continuation probability.',
    ],
    ['Payments', 'Paid sessions follow your institution’s payment rules.'],
  ];
  return (
    <section aria-labelledby="cautions" className="max-w-3xl rounded-lg border border-slate-200 bg-white p-4">
      <h2 id="cautions" className="mb-2 flex items-center gap-2 text-lg font-semibold">
        <span aria-hidden="true">ℹ</span> Before you run experiments with people
      </h2>
      <ul className={compact ? 'flex flex-col gap-1 text-sm' : 'flex flex-col gap-2'}>
        {items.map(([title, text]) => (
          <li key={title} className="text-slate-700">
            <strong className="text-slate-900">{title}.</strong> {text}
          </li>
        ))}
      </ul>
    </section>
  );
}
