import { HttpError } from '../lib/errors';

/**
 * The one rule for a new password (invitation sign-up, password reset, first-owner setup, any later change):
 * besides the length the shared schema checks (`newPasswordSchema`), it may not contain the person's e-mail
 * name or name, and must not be easy to guess. Guessability is zxcvbn's estimate (`@zxcvbn-ts/core` with the
 * common-password and English dictionaries): a score of 3 or more ("safely unguessable", under 10^10 guesses
 * for score 2) is required — the score its authors (Wheeler, "zxcvbn: Low-Budget Password Strength Estimation",
 * USENIX Security 2016) describe as resisting an offline attack on a slow hash; common practice, no standard.
 */
export const MIN_PASSWORD_SCORE = 3;

type Checker = (password: string, userInputs: string[]) => { score: number; warning: string | null; suggestions: string[] };

let checker: Promise<Checker> | undefined;

/**
 * The zxcvbn dictionaries are several megabytes: loaded on the first password check (or by `warmPasswordRules`
 * after the server has started), never on the sign-in path.
 */
function loadChecker(): Promise<Checker> {
  checker ??= (async () => {
    const [{ ZxcvbnFactory }, common, en] = await Promise.all([
      import('@zxcvbn-ts/core'),
      import('@zxcvbn-ts/language-common'),
      import('@zxcvbn-ts/language-en'),
    ]);
    const zxcvbn = new ZxcvbnFactory({
      dictionary: { ...common.dictionary, ...en.dictionary },
      graphs: common.adjacencyGraphs,
      translations: en.translations,
    });
    return (password, userInputs) => {
      const r = zxcvbn.check(password, userInputs);
      return { score: r.score, warning: r.feedback.warning || null, suggestions: r.feedback.suggestions };
    };
  })();
  return checker;
}

/** Loads the dictionaries ahead of the first check (the server calls it once it listens). */
export function warmPasswordRules(): void {
  void loadChecker().catch((e: unknown) => console.error('[coilpath] could not load the password dictionaries', e));
}

/** The parts of an e-mail name and a person's name a password may not contain (3 characters or more). */
export function personalWords(person: { email: string; name?: string | null }): string[] {
  const local = person.email.split('@')[0]!.toLowerCase();
  const words = [local, ...local.split(/[^\p{L}\p{N}]+/u), ...(person.name ?? '').toLowerCase().split(/[^\p{L}\p{N}]+/u)];
  return [...new Set(words.filter((w) => w.length >= 3))];
}

/** Why the password is refused, or null when it is acceptable. */
export async function passwordProblem(password: string, person: { email: string; name?: string | null }): Promise<string | null> {
  const lower = password.toLowerCase();
  const words = personalWords(person);
  const found = words.find((w) => lower.includes(w));
  if (found) return `The password contains "${found}" from your e-mail address or name, which others can guess. Choose one without it.`;
  const check = await loadChecker();
  const r = check(password, [...words, 'coilpath']);
  if (r.score >= MIN_PASSWORD_SCORE) return null;
  const why = r.warning ? `${r.warning.replace(/\.?$/, '.')} ` : '';
  const hint = r.suggestions[0] ? ` ${r.suggestions[0]}` : '';
  return `This password is too easy to guess. ${why}Use a longer phrase of several unrelated words.${hint}`.replace(/\s+/g, ' ').trim();
}

/** Throws 400 `weak_password` (naming the field, as a schema failure does) when the password breaks the rule. */
export async function assertPasswordAllowed(password: string, person: { email: string; name?: string | null }): Promise<void> {
  const problem = await passwordProblem(password, person);
  if (problem) throw new HttpError(400, 'weak_password', problem, { fields: [{ path: 'password', message: problem }] });
}
