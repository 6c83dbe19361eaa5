import type { ParticipantView } from '#realtime/engine/types';

/** The stage game as the phone shows it: your choice by row, your partner's by column. */
export function PayoffTable({ table, labels }: { table: ParticipantView['payoffTable']; labels: { C: string; D: string } }) {
  const cell = (own: 'C' | 'D', partner: 'C' | 'D') => table.find((r) => r.own === own && r.partner === partner)!;
  return (
    <table className="w-full table-fixed border-collapse text-center text-base" aria-label="Points per round">
      <thead>
        <tr>
          <th scope="col" className="w-1/3 p-1 text-left text-sm font-normal text-slate-600">
            You ↓ · partner →
          </th>
          <th scope="col" className="p-1 font-semibold">
            {labels.C}
          </th>
          <th scope="col" className="p-1 font-semibold">
            {labels.D}
          </th>
        </tr>
      </thead>
      <tbody>
        {(['C', 'D'] as const).map((own) => (
          <tr key={own}>
            <th scope="row" className="p-1 text-left font-semibold">
              {labels[own]}
            </th>
            {(['C', 'D'] as const).map((partner) => {
              const c = cell(own, partner);
              return (
                <td key={partner} className="border border-slate-200 bg-white p-2">
                  <span className="num block text-lg font-semibold">you {c.ownPoints}</span>
                  <span className="num block text-sm text-slate-600">partner {c.partnerPoints}</span>
                </td>
              );
            })}
          </tr>
        ))}
      </tbody>
    </table>
  );
}
