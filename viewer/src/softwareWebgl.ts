/**
 * The WebGL renderer's name, and whether it draws in software (SwiftShader,
 * llvmpipe, a basic render driver): there antialiasing multiplies the work of
 * every frame on the CPU, so the surface is drawn without it.
 */
export function webglRenderer(): { name: string; software: boolean } {
  const canvas = document.createElement('canvas');
  const gl = (canvas.getContext('webgl2') ?? canvas.getContext('webgl')) as WebGLRenderingContext | null;
  if (!gl) return { name: 'none', software: true };
  const info = gl.getExtension('WEBGL_debug_renderer_info');
  const name = String(gl.getParameter(info ? info.UNMASKED_RENDERER_WEBGL : gl.RENDERER));
  gl.getExtension('WEBGL_lose_context')?.loseContext();
  return { name, software: /swiftshader|llvmpipe|softpipe|software|basic render/i.test(name) };
}
