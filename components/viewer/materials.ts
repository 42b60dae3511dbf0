/**
 * The shaders of the toolpath lines. One vertex layout for every style: the position and four bytes of the segment
 * ending at that vertex (kind, tool, work offset; `flat`, so WebGL2 takes them from each line's last vertex). The
 * colour comes from a small palette texture by the chosen mode and the work offset's origin from another (machine
 * space), so switching colours or spaces changes a uniform and rebuilds nothing. Rapids are dotted in the
 * fragment shader (every other 2-pixel step along the screen), so they read apart from cuts in any colour.
 */
import * as THREE from "three";
import { KIND_COLORS, rgb, seriesColor } from "./palette";

export type ColorMode = "kind" | "tool" | "offset";
const MODE: Record<ColorMode, number> = { kind: 0, tool: 1, offset: 2 };
/** uMode of a single fixed colour (selection, overlay). */
const FIXED = 3;

/** 256 entries per row: motion kinds, tools (by tool byte), work offsets. */
export function paletteTexture(): THREE.DataTexture {
  const data = new Uint8Array(256 * 3 * 4);
  for (let i = 0; i < 256; i++) {
    const rows = [KIND_COLORS[i] ?? "#ffffff", i === 255 ? "#9aa3ad" : seriesColor(i), seriesColor(i)];
    rows.forEach((hex, row) => {
      const [r, g, b] = rgb(hex);
      data.set([r, g, b, 255], (row * 256 + i) * 4);
    });
  }
  const tex = new THREE.DataTexture(data, 256, 3, THREE.RGBAFormat, THREE.UnsignedByteType);
  tex.needsUpdate = true;
  return tex;
}

/** Per work offset index: xyz of its origin and w = 1 when it is placed (machine space). */
export function originTexture(): THREE.DataTexture {
  const tex = new THREE.DataTexture(new Float32Array(256 * 4), 256, 1, THREE.RGBAFormat, THREE.FloatType);
  tex.needsUpdate = true;
  return tex;
}

export function setOrigins(tex: THREE.DataTexture, origins: readonly ({ x: number; y: number; z: number } | null)[]): void {
  const d = tex.image.data as Float32Array;
  d.fill(0);
  origins.forEach((o, i) => {
    if (i < 256 && o) d.set([o.x, o.y, o.z, 1], i * 4);
  });
  tex.needsUpdate = true;
}

const vertexShader = /* glsl */ `
in vec4 seg;
uniform sampler2D uPalette;
uniform sampler2D uOrigins;
uniform int uMode;
uniform float uMachine;
uniform vec3 uFixed;
uniform float uPointSize;
flat out vec4 vColor;
flat out int vId;
void main() {
  ivec4 s = ivec4(seg * 255.0 + 0.5);
  vec4 o = texelFetch(uOrigins, ivec2(s.z, 0), 0);
  vec3 p = position + (uMachine > 0.5 ? o.xyz : vec3(0.0));
  int idx = uMode == 0 ? s.x : (uMode == 1 ? s.y : s.z);
  vec3 c = uMode == ${FIXED} ? uFixed : texelFetch(uPalette, ivec2(idx, uMode), 0).rgb;
  vColor = vec4(c, (uMachine > 0.5 && o.w < 0.5) ? 1.0 : 0.0);
  vId = gl_VertexID;
  gl_PointSize = uPointSize;
  gl_Position = projectionMatrix * modelViewMatrix * vec4(p, 1.0);
}`;

const fragmentShader = /* glsl */ `
flat in vec4 vColor;
flat in int vId;
uniform float uOpacity;
uniform float uDotted;
uniform float uPick;
layout(location = 0) out highp vec4 outColor;
void main() {
  if (vColor.a > 0.5) discard;
  if (uDotted > 0.5 && mod(floor(gl_FragCoord.x * 0.5) + floor(gl_FragCoord.y * 0.5), 2.0) < 1.0) discard;
  if (uPick > 0.5) {
    // the vertex number of the line's last vertex, plus one (0 is "nothing here"), in the RGB bytes
    int id = vId + 1;
    outColor = vec4(float(id & 255), float((id >> 8) & 255), float((id >> 16) & 255), 255.0) / 255.0;
    return;
  }
  outColor = vec4(vColor.rgb, uOpacity);
}`;

export interface PathMaterialOptions {
  palette: THREE.DataTexture;
  origins: THREE.DataTexture;
  dotted?: boolean;
  fixed?: string;
  opacity?: number;
  pick?: boolean;
  onTop?: boolean;
  pointSize?: number;
}

export function pathMaterial(o: PathMaterialOptions): THREE.ShaderMaterial {
  const fixed = o.fixed ? new THREE.Color().setRGB(...(rgb(o.fixed).map((v) => v / 255) as [number, number, number])) : new THREE.Color(1, 1, 1);
  const opacity = o.opacity ?? 1;
  return new THREE.ShaderMaterial({
    glslVersion: THREE.GLSL3,
    vertexShader,
    fragmentShader,
    uniforms: {
      uPalette: { value: o.palette },
      uOrigins: { value: o.origins },
      uMode: { value: o.fixed ? FIXED : 0 },
      uMachine: { value: 0 },
      uFixed: { value: fixed },
      uOpacity: { value: opacity },
      uDotted: { value: o.dotted ? 1 : 0 },
      uPick: { value: o.pick ? 1 : 0 },
      uPointSize: { value: o.pointSize ?? 1 },
    },
    // in the transparent pass (drawn in renderOrder), so the safe-Z planes go first and never tint the path
    transparent: true,
    depthTest: !o.onTop,
    depthWrite: !o.onTop && opacity >= 1,
  });
}

/** Sets the colour mode of a (non-fixed) path material. */
export function setColorMode(m: THREE.ShaderMaterial, mode: ColorMode): void {
  if (m.uniforms.uMode!.value !== FIXED) m.uniforms.uMode!.value = MODE[mode];
}

export function setMachineSpace(m: THREE.ShaderMaterial, machine: boolean): void {
  m.uniforms.uMachine!.value = machine ? 1 : 0;
}
