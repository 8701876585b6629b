import { parameterSymbol } from "../utils";

/** Background for |r|: transparent at 0, strongest at 1; ember for positive, frost for negative. */
function cellStyle(r: number | null): React.CSSProperties {
  if (r === null || !Number.isFinite(r)) return {};
  const a = Math.min(1, Math.abs(r));
  const colour = r >= 0 ? "var(--color-ember)" : "var(--color-frost)";
  return { backgroundColor: `color-mix(in oklch, ${colour} ${Math.round(a * 55)}%, transparent)` };
}

/**
 * The correlation matrix of the free parameters. Entries with |r| > 0.95 are marked: those parameters
 * trade off against each other and the data cannot pin them apart.
 */
export function CorrelationMatrix({ names, correlation }: { names: readonly string[]; correlation: readonly (readonly (number | null)[])[] }) {
  if (names.length < 2) {
    return <p className="text-sm text-ink-muted">One free parameter: there are no correlations to show.</p>;
  }
  return (
    <div className="overflow-x-auto">
      <table className="border-collapse font-mono text-xs tabular-nums" aria-label="Correlation matrix of the free parameters">
        <thead>
          <tr>
            <th scope="col" className="p-1" />
            {names.map((n) => (
              <th key={n} scope="col" className="p-1 text-center font-normal">
                {parameterSymbol(n)}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {names.map((row, i) => (
            <tr key={row}>
              <th scope="row" className="p-1 pr-2 text-right font-normal">
                {parameterSymbol(row)}
              </th>
              {names.map((col, j) => {
                const r = correlation[i]?.[j] ?? null;
                const strong = i !== j && r !== null && Math.abs(r) > 0.95;
                return (
                  <td
                    key={col}
                    style={cellStyle(i === j ? null : r)}
                    className={`min-w-14 border border-line p-1 text-center ${strong ? "font-bold outline-2 -outline-offset-2 outline-caution" : ""}`}
                    title={strong ? "strongly correlated (|r| > 0.95)" : undefined}
                  >
                    {i === j ? "1" : r === null ? "—" : r.toFixed(3)}
                    {strong ? <span className="sr-only"> strongly correlated</span> : null}
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
