import { describe, expect, it } from 'vitest';
import { passwordProblem, personalWords } from './password-rules';

const dana = { email: 'dana.whitfield@test.example', name: 'Dana Whitfield' };

describe('password rules', () => {
  // "password123" and "qwerty2024" are from the common-password lists zxcvbn ships (passwords-common,
  // @zxcvbn-ts/language-common) or close to them (qwerty + a year); the reference library decides.
  it.each(['password123', 'qwerty2024', 'iloveyou12', 'letmein2024!'])('refuses the common password %s, saying why', async (p) => {
    const problem = await passwordProblem(p, dana);
    expect(problem).toMatch(/^This password is too easy to guess\./);
  });

  it('refuses a password containing the e-mail name or the name, naming the part', async () => {
    expect(await passwordProblem('Whitfield-Orbit-Fjord-47', dana)).toBe(
      'The password contains "whitfield" from your e-mail address or name, which others can guess. Choose one without it.',
    );
    expect(await passwordProblem('kettle-DANA-orbit-fjord', dana)).toContain('"dana"');
    expect(await passwordProblem('tuesday-orbit-x1', { email: 'x@test.example', name: 'Tuesday Lane' })).toContain('"tuesday"');
  });

  it('accepts a long phrase of unrelated words', async () => {
    expect(await passwordProblem('Kettle-Orbit-Fjord-47', dana)).toBeNull();
    expect(await passwordProblem('plum canyon radio tulip', dana)).toBeNull();
  });

  it('reads the e-mail name whole and in its parts, ignoring parts under 3 characters', () => {
    expect(personalWords({ email: 'jo.de-la.rosa@test.example', name: 'Jo de la Rosa' })).toEqual(['jo.de-la.rosa', 'rosa']);
  });
});
