import { evaluate, evaluateRequest } from '../src/lib/pricing/evaluate';
import { pricingRequestSchema } from '../src/lib/pricing/schema';
import { defaultPricingSettings, mergeSettings } from '../src/lib/pricing/settings';
function body(n: number) {
  const lines: any[] = [];
  for (let k = 0; k < n - 2; k++) {
    const m = k % 4;
    if (m === 0) lines.push({ kind: 'part', description: 'Part ' + k, quantity: String(1 + (k % 3)), unitCost: (7.35 + k * 3.17).toFixed(2), specialOrder: k % 7 === 0 });
    else if (m === 1) lines.push({ kind: 'labour', description: 'Labour ' + k, hours: '0.75' });
    else if (m === 2) lines.push({ kind: 'part', description: 'Part ' + k, quantity: '2', unitCost: (42.1 + k).toFixed(2) });
    else lines.push({ kind: 'fee', description: 'Fee ' + k, amount: '12.50' });
  }
  return { currency: 'USD', settings: { taxRate: '0.0725' }, unit: { ageYears: '4', engineHours: '420', lifeYears: '10', lifeHours: '1500', condition: 'good', asIsValue: '40' },
    options: [ { label: 'Repair', kind: 'repair', lifeYears: '4', lines }, { label: 'Replace', kind: 'replacement', lines: [ { kind: 'unit', description: 'New', cost: '720', price: '899' }, { kind: 'fee', description: 'Disposal', amount: '25' } ] } ] };
}
for (const n of [5, 20, 100]) {
  const b = body(n);
  const req = pricingRequestSchema.parse(b);
  const settings = mergeSettings(defaultPricingSettings, req.settings, { currency: 'USD' });
  for (let k = 0; k < 2000; k++) evaluate(req, settings);
  let t = performance.now(); let it = 0;
  while (performance.now() - t < 1500) { evaluate(req, settings); it++; }
  const us = (performance.now() - t) * 1000 / it;
  t = performance.now(); let it2 = 0;
  while (performance.now() - t < 1500) { evaluateRequest(b); it2++; }
  const us2 = (performance.now() - t) * 1000 / it2;
  console.log(n, 'engine', us.toFixed(1), 'us', (1e6/us).toFixed(0), '/s ; full', us2.toFixed(1), 'us');
}
