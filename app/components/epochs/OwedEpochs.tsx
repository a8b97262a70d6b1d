// Beside the commitments on the ranking board: what earlier multi-semester programmes still owe.
export type Owed = { proposalId: number; code: string; title: string; lostEpochs: number; madeUpEpochs: number; overdueEpochs: number; hoursOwed: number; executedEpochs: number };

export function OwedEpochs({ owed }: { owed: Owed[] }) {
  return (
    <div className="space-y-1" aria-labelledby="owed-title">
      <h3 id="owed-title" className="text-sm font-semibold">Still owed to earlier multi-semester programmes</h3>
      {owed.length === 0 ? (
        <p className="text-sm text-slate-600">None: every epoch of earlier calls' accepted programmes due so far is in the epoch log as executed, or lost and made up.</p>
      ) : (
        <table className="table-base" aria-label="Owed epochs">
          <thead><tr><th>Programme</th><th>Executed</th><th>Lost</th><th>Made up</th><th>Past due, not logged</th><th>Hours owed</th></tr></thead>
          <tbody>
            {owed.map((o) => (
              <tr key={o.proposalId}>
                <td title={o.title}>{o.code}</td>
                <td className="tabular-nums">{o.executedEpochs}</td>
                <td className="tabular-nums">{o.lostEpochs}</td>
                <td className="tabular-nums">{o.madeUpEpochs}</td>
                <td className="tabular-nums">{o.overdueEpochs}</td>
                <td className="tabular-nums" data-testid={`owed-${o.proposalId}`}>{o.hoursOwed.toFixed(2)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </div>
  );
}
