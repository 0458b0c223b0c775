import bcrypt from 'bcryptjs';
import { z } from 'zod';

const COST = 10;

export const passwordSchema = z
  .string()
  .min(10, { error: 'Use at least 10 characters.' })
  .max(200, { error: 'Use at most 200 characters.' });

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, COST);
}

export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}

let dummy: string | undefined;
/** A hash compared against when the e-mail is unknown, so timing does not reveal which accounts exist. */
export function dummyHash(): string {
  return (dummy ??= bcrypt.hashSync('steerwise-no-such-account', COST));
}
