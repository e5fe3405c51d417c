(globalThis as any).T = { price: 0, optres: 0, repl: 0, value: 0, assess: 0 };
import { evaluate } from '../src/lib/pricing/evaluate';
import { pricingRequestSchema } from '../src/lib/pricing/schema';
import { defaultPricingSettings, mergeSettings } from '../src/lib/pricing/settings';
const n = Number(process.argv[2] ?? 5);
const lines: any[] = [];
for (let k = 0; k < n - 2; k++) {
  const m = k % 4;
  if (m === 0) lines.push({ kind: 'part', description: 'Part ' + k, quantity: String(1 + (k % 3)), unitCost: (7.35 + k * 3.17).toFixed(2), specialOrder: k % 7 === 0 });
  else if (m === 1) lines.push({ kind: 'labour', description: 'Labour ' + k, hours: '0.75' });
  else if (m === 2) lines.push({ kind: 'part', description: 'Part ' + k, quantity: '2', unitCost: (42.1 + k).toFixed(2) });
  else lines.push({ kind: 'fee', description: 'Fee ' + k, amount: '12.50' });
}
const b = { currency: 'USD', settings: { taxRate: '0.0725' }, unit: { ageYears: '4', engineHours: '420', lifeYears: '10', lifeHours: '1500', condition: 'good', asIsValue: '40' },
    options: [ { label: 'Repair', kind: 'repair', lifeYears: '4', lines }, { label: 'Replace', kind: 'replacement', lines: [ { kind: 'unit', description: 'New', cost: '720', price: '899' }, { kind: 'fee', description: 'Disposal', amount: '25' } ] } ] };
const req = pricingRequestSchema.parse(b);
const settings = mergeSettings(defaultPricingSettings, req.settings, { currency: 'USD' });
for (let k = 0; k < 5000; k++) evaluate(req, settings);
const T = (globalThis as any).T; for (const k in T) T[k] = 0;
const N = 20000; const t = performance.now(); for (let k = 0; k < N; k++) evaluate(req, settings);
console.log('total', ((performance.now() - t) * 1000 / N).toFixed(1));
for (const k in T) console.log(k, (T[k] * 1000 / N).toFixed(1));
