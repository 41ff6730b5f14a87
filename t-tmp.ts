import { ratePlanDefinitionSchema } from './libs/contracts/src/index';
const base = { currency: 'USD', seasons: [{ name: 'All year', fromMonth: 1, toMonth: 12, offPeakPrice: 0.08, periods: [] }] };
for (const bad of [{ ...base.seasons[0], fromMonth: 13 }, { ...base.seasons[0], name: '' }, { ...base.seasons[0], toMonth: 1.5 }]) {
  const t = Date.now();
  const r = ratePlanDefinitionSchema.safeParse({ ...base, currency: 'usd', seasons: [ { ...bad, fromMonth: bad.fromMonth } ] });
  console.log(r.success, r.error?.issues.map(i => i.message), Date.now() - t);
}
