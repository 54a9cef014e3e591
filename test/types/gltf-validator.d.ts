// The gltf-validator package ships no type declarations; this covers the part the tests use.
declare module 'gltf-validator' {
  export interface ValidationReport {
    issues: { numErrors: number; numWarnings: number; numInfos: number; numHints: number; messages: { code: string; message: string; pointer?: string }[] };
  }
  export function validateBytes(data: Uint8Array, options?: Record<string, unknown>): Promise<ValidationReport>;
  const validator: { validateBytes: typeof validateBytes };
  export default validator;
}
