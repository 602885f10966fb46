import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { validateSpec } from '../../src/experiment/check.ts';
import { armModel } from '../../src/experiment/spec.ts';
import { specRefusal } from '../helpers.ts';

const preset = () => JSON.parse(readFileSync(new URL('../../presets/shortest-path-max-vs-sum.json', import.meta.url), 'utf8')) as Record<string, unknown>;

const refusal = specRefusal;

describe('bad specs are refused with the field named', () => {
  it('missing field', () => {
    const spec = preset();
    delete spec['task'];
    expect(refusal(spec)).toMatch(/^task: missing/);
  });
  it('wrong type', () => {
    const spec = preset();
    spec['seeds'] = { count: 'five' };
    expect(refusal(spec)).toMatch(/seeds\.count: got "five", expected number/);
  });
  it('out-of-range size names the allowed maximum', () => {
    const spec = preset();
    spec['test'] = { sizes: [16, 5000] };
    expect(refusal(spec)).toMatch(/test\.sizes\[1\]: got 5000, allowed at most 512/);
  });
  it('unknown aggregator lists the allowed ones', () => {
    const spec = preset();
    spec['arms'] = [{ name: 'x', model: { aggregator: 'median' } }, { name: 'y' }];
    expect(refusal(spec)).toMatch(/arms\[0\]\.model\.aggregator: got "median", allowed "sum" \| "mean" \| "max"/);
  });
  it('task that does not fit the family', () => {
    const spec = preset();
    spec['task'] = 'charge-potential';
    expect(refusal(spec)).toMatch(/train\.family: task "charge-potential" does not make sense on family "er"/);
  });
  it('unknown keys and prototype names', () => {
    const spec = preset();
    spec['colour'] = 'teal';
    expect(refusal(spec)).toMatch(/unknown field "colour"/);
    const proto = preset();
    proto['task'] = 'constructor';
    expect(refusal(proto)).toMatch(/^task: got "constructor", allowed/);
  });
  it('too many runs', () => {
    const spec = preset();
    spec['seeds'] = { count: 64 };
    spec['arms'] = Array.from({ length: 9 }, (_, i) => ({ name: `arm ${i}` }));
    expect(refusal(spec)).toMatch(/576 runs, allowed at most 512/);
  });
});

describe('arms override only what they state', () => {
  it('keeps shared model settings the arm does not mention', () => {
    const spec = validateSpec({
      ...preset(),
      model: { hidden: 12, aggregator: 'max', steps: { rule: 'fixed', count: 7 } },
      arms: [{ name: 'a' }, { name: 'b', model: { bias: false, steps: { count: 9 } } }],
    });
    expect(armModel(spec, 0)).toMatchObject({ hidden: 12, aggregator: 'max', bias: true });
    expect(armModel(spec, 1)).toMatchObject({ hidden: 12, aggregator: 'max', bias: false });
    expect(armModel(spec, 1).steps).toMatchObject({ rule: 'fixed', count: 9 });
  });
  it('validation is idempotent', () => {
    const once = validateSpec(preset());
    expect(validateSpec(JSON.parse(JSON.stringify(once)))).toEqual(once);
  });
});
