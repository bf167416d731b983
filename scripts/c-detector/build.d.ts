export const C_STRICT_FLAGS: readonly string[];
export const C_SANITIZER_FLAGS: readonly string[];
export function compilerVersion(): string | undefined;
export function exportC(model: string, dir: string): string;
export function compileC(dir: string, name: string, build: 'float' | 'integer', extraFlags: readonly string[]): string;
export function writePgm(path: string, image: { width: number; height: number; data: Uint8Array }): void;
