/** The error `action` throws, or undefined when it returns; lets a test inspect code and message together. */
export function errorOf(action: () => unknown): unknown {
  try {
    action();
  } catch (error) {
    return error;
  }
  return undefined;
}
