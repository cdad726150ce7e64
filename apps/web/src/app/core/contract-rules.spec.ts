import {
  email as emailContract,
  invitableRoles as contractInvitableRoles,
  invitableRolesByRole as contractInvitableRolesByRole,
  inviteRequest,
  memberManagingRoles as contractMemberManagingRoles,
  organisationKinds,
  password as passwordContract,
  roles as contractRoles,
  rolesByKind as contractRolesByKind,
} from '@evalon/contracts';
import { FormControl } from '@angular/forms';
import { passwordValidator } from '../shared/forms';
import {
  allRoles,
  emailMaxLength,
  invitableRoles,
  invitableRolesByRole,
  memberManagingRoles,
  nameMaxLength,
  passwordRule,
  rolesByKind,
} from './contract-rules';

// The client restates a few contract rules as plain values (see contract-rules.ts); these checks
// hold them to the contract itself, so the two cannot drift apart silently.
describe('contract rules restated for the browser', () => {
  it('lists the same roles, and the same roles per kind of organisation', () => {
    expect(allRoles).toEqual([...contractRoles]);
    expect(rolesByKind).toEqual(contractRolesByKind);
  });

  it('has the same member-managing roles and invitation matrix', () => {
    expect(memberManagingRoles).toEqual(contractMemberManagingRoles);
    expect(invitableRolesByRole).toEqual(contractInvitableRolesByRole);
  });

  it('offers the same roles to invite as the contract, for every kind, held roles and admin flag', () => {
    // Every subset of roles held, in every kind of organisation, with and without platform admin.
    let compared = 0;
    for (const kind of organisationKinds) {
      for (let mask = 0; mask < 1 << contractRoles.length; mask++) {
        const held = contractRoles.filter((_, i) => mask & (1 << i));
        for (const admin of [false, true]) {
          expect(invitableRoles(kind, held, admin)).toEqual(
            contractInvitableRoles(kind, held, admin),
          );
          compared++;
        }
      }
    }
    expect(compared).toBe(4 * 64 * 2);
  });

  it.each(['', 'a'.repeat(9), 'a'.repeat(10), 'a'.repeat(200), 'a'.repeat(201)])(
    'password case %#: the validator agrees with the contract',
    (value) => {
      const contract = passwordContract.safeParse(value);
      const errors = passwordValidator(new FormControl(value));
      if (value === '') {
        expect(errors).toBeNull(); // Emptiness is the `required` validator's job.
        return;
      }
      expect(errors === null).toBe(contract.success);
      if (!contract.success) expect(errors?.['password']).toBe(contract.error.issues[0].message);
    },
  );

  it('uses the contract’s password messages', () => {
    const short = passwordContract.safeParse('short');
    const long = passwordContract.safeParse('x'.repeat(201));
    expect(short.success || short.error.issues[0].message).toBe(passwordRule.tooShort);
    expect(long.success || long.error.issues[0].message).toBe(passwordRule.tooLong);
  });

  it('limits names to the contract’s length', () => {
    expect(inviteRequest.shape.name.safeParse('n'.repeat(nameMaxLength)).success).toBe(true);
    expect(inviteRequest.shape.name.safeParse('n'.repeat(nameMaxLength + 1)).success).toBe(false);
  });

  it('limits e-mail addresses to the contract’s length', () => {
    const at = (length: number) => `${'a'.repeat(64)}@${'b'.repeat(length - 64 - 1 - 8)}.example`;
    expect(at(emailMaxLength)).toHaveLength(emailMaxLength);
    expect(emailContract.safeParse(at(emailMaxLength)).success).toBe(true);
    expect(emailContract.safeParse(at(emailMaxLength + 1)).success).toBe(false);
  });
});
