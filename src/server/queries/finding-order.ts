import { sql, type SQL } from 'drizzle-orm';

/**
 * How findings are ranked when one stands for a run or a build ("the worst finding"): failures
 * before warnings, then the kinds that say most about the scheme (non-finite values first, then
 * TV growth and new extrema, bounds, drift, and baseline comparisons last), then the earliest
 * step. `f` is the alias of the findings table in the query.
 */
export function worstFindingOrder(alias = 'f'): SQL {
  const f = sql.raw(alias);
  return sql`(${f}.severity = 'fail') desc,
    case ${f}.kind when 'non-finite' then 0 when 'tv-growth' then 1 when 'new-extrema' then 2 when 'overshoot' then 3
      when 'undershoot' then 4 when 'conservation-drift' then 5 else 6 end,
    ${f}.step nulls last`;
}
