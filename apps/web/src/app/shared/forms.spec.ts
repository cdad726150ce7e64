import { FormControl } from '@angular/forms';
import { password as passwordContract } from '@evalon/contracts';
import { passwordValidator } from './forms';

describe('passwordValidator', () => {
  it.each(['', 'a'.repeat(9), 'a'.repeat(10), 'a'.repeat(200), 'a'.repeat(201)])(
    'password case %#: agrees with the contract, in its words',
    (value) => {
      const contract = passwordContract.safeParse(value);
      const errors = passwordValidator(new FormControl(value));
      if (value === '') {
        expect(errors).toBeNull(); // Emptiness is the `required` validator's job.
        return;
      }
      expect(errors === null).toBe(contract.success);
      if (!contract.success) expect(errors?.['password']).toBe(contract.error.issues[0]?.message);
    },
  );
});
