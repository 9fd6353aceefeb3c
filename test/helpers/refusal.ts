/**
 * The error a call throws, checked to be of the expected class; fails the test
 * when the call returns instead (for tests of what a checker refuses).
 */
import { expect } from 'vitest';

export function refusalOf<E extends Error>(errorClass: abstract new (...args: never[]) => E, call: () => unknown): E {
  try {
    call();
  } catch (error) {
    expect(error).toBeInstanceOf(errorClass);
    return error as E;
  }
  throw new Error(`expected a ${errorClass.name}, but the call returned`);
}
