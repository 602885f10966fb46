/** Types for scripts/build-simd.mjs (used by the drift test). */
export function compileKernels(text: string): Promise<string>;
export function renderBinaryModule(base64: string): string;
