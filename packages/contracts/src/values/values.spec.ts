import * as fs from 'node:fs';
import * as path from 'node:path';
import { depositRequest } from '../payments';
import { password } from '../identity';
import { passwordRule, purchaseOrderProblem } from './index';

describe('@evalon/contracts/values', () => {
  it('imports nothing but other value files (the browser loads it without zod)', () => {
    const dir = __dirname;
    for (const file of fs
      .readdirSync(dir)
      .filter((f) => f.endsWith('.ts') && !f.endsWith('.spec.ts'))) {
      const text = fs.readFileSync(path.join(dir, file), 'utf8');
      const imports = [...text.matchAll(/from '([^']+)'/g)].map((m) => m[1]);
      expect({ file, outside: imports.filter((i) => !i!.startsWith('./')) }).toEqual({
        file,
        outside: [],
      });
    }
  });

  it('checks purchase order numbers exactly as the deposit request schema does, with its words', () => {
    const samples = [
      'PO-2027-0042',
      '  PO 17/B #3  ',
      'Bestellung_ÄÖÜ.9',
      '',
      '   ',
      'x'.repeat(64),
      'x'.repeat(65),
      'PO;DROP',
      'PO<42>',
      'Ünïcödé-№',
    ];
    for (const sample of samples) {
      const parsed = depositRequest.safeParse({
        method: 'credit_agreement',
        purchaseOrderNumber: sample,
      });
      const problem = purchaseOrderProblem(sample);
      expect({ sample, ok: problem === null }).toEqual({ sample, ok: parsed.success });
      if (!parsed.success) expect(problem).toBe(parsed.error.issues[0]?.message);
    }
  });

  it('gives the password schema its limits and messages', () => {
    const short = password.safeParse('x'.repeat(passwordRule.minLength - 1));
    const long = password.safeParse('x'.repeat(passwordRule.maxLength + 1));
    expect(short.success || short.error.issues[0]?.message).toBe(passwordRule.tooShort);
    expect(long.success || long.error.issues[0]?.message).toBe(passwordRule.tooLong);
    expect(password.safeParse('x'.repeat(passwordRule.minLength)).success).toBe(true);
  });
});
