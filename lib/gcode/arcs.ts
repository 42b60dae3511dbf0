/**
 * G2/G3 arcs in the three planes: centre (I/J/K, incremental or G90.1 absolute) or radius format, the dialect's
 * tolerance, full circles, exact bounds through the axis extremes, and chords for the toolpath.
 */
import { R } from "./rules";
import { ARC_A0, ARC_CA, ARC_CB, ARC_OK, ARC_R, ARC_RADIUS_TOO_SMALL, ARC_REND, ARC_SWEEP, arcExtremes, arcFromCenter, arcFromRadius, chordCount } from "./arc";
import { Engine } from "./state";
import * as codes from "./codes";

// imported constants copied into module constants (codes.ts says why)
const { B_R, K_ARC, L_I, L_J, L_K, L_R, L_X, L_Y, L_Z, MAX_CHORDS, fmt } = codes;

const A_CA = ARC_CA, A_CB = ARC_CB, A_R = ARC_R, A_A0 = ARC_A0, A_SWEEP = ARC_SWEEP, A_REND = ARC_REND;

declare module "./state" {
  interface Engine {
    arc(line: number, cw: boolean, mask: number): void;
  }
}

const pp = Engine.prototype;

pp.arc = function (this: Engine, line: number, cw: boolean, mask: number): void {
  const lv = this.lv;
  const sc = this.sc;
  // plane axes: first, second, normal; offsets letters
  let ia: number, ib: number, ic: number, la: number, lb: number, oa: number, ob: number;
  if (this.plane === 17) {
    ia = 0; ib = 1; ic = 2; la = L_X; lb = L_Y; oa = L_I; ob = L_J;
  } else if (this.plane === 18) {
    ia = 2; ib = 0; ic = 1; la = L_Z; lb = L_X; oa = L_K; ob = L_I;
  } else {
    ia = 1; ib = 2; ic = 0; la = L_Y; lb = L_Z; oa = L_J; ob = L_K;
  }
  this.target(mask);
  const tgt = this.tgt;
  const pos = this.pos;
  const planeName = this.plane === 17 ? "XY" : this.plane === 18 ? "XZ" : "YZ";
  const hasR = (mask & B_R) !== 0;
  const hasCentre = (mask & ((1 << oa) | (1 << ob))) !== 0;
  // the common dialect reads a centre with no end point in the plane as a full circle
  if (!(mask & ((1 << la) | (1 << lb))) && !(this.common && hasCentre && !hasR)) {
    this.say(R.arcInvalid, "error", line, `arc with no end point in the ${planeName} plane`);
    this.markNotEvaluated(line);
    return;
  }
  if (hasR && hasCentre) {
    this.say(R.arcInvalid, "error", line, "arc with both R and a centre (I/J/K)");
    this.markNotEvaluated(line);
    return;
  }
  if (!hasR && !hasCentre) {
    this.say(R.arcInvalid, "error", line, "arc with neither R nor a centre offset (I/J/K)");
    this.markNotEvaluated(line);
    return;
  }
  let sa = pos[ia]!, sb = pos[ib]!, ea = tgt[ia]!, eb = tgt[ib]!;
  const known = sa === sa && sb === sb && ea === ea && eb === eb;
  if (!known) {
    if (this.absolute || this.arcAbsolute) {
      this.say(R.arcStartUnknown, "warning", line, "arc from a position that is not known: it is not drawn");
      this.cutNow = false;
      this.mlen = 0;
      this.account(line, K_ARC);
      pos[0] = tgt[0]!;
      pos[1] = tgt[1]!;
      pos[2] = tgt[2]!;
      return;
    }
    // incremental: the arc is known relative to its start, so its length is
    sa = 0;
    sb = 0;
    ea = this.inc[ia]!;
    eb = this.inc[ib]!;
  }
  const out = this.arcOut;
  if (hasR) {
    const r = lv[L_R]! * sc;
    // strict: the [NIST] rule (R short by a relative 1e-12 at most); common: short by the arc tolerance at most
    const st = arcFromRadius(sa, sb, ea, eb, r, cw, out, this.common ? this.arcTolerance(this.progInch) : 0);
    if (st !== ARC_OK) {
      this.say(R.arcInvalid, "error", line,
        st === ARC_RADIUS_TOO_SMALL
          ? `radius R${fmt(lv[L_R]!)} is shorter than half the distance to the end point`
          : "radius-format arc whose end point is its start point");
      this.markNotEvaluated(line);
      return;
    }
  } else {
    let ci: number, cj: number;
    if (this.arcAbsolute) {
      // G90.1: I/J/K are the centre's own coordinates
      ci = mask & (1 << oa) ? lv[oa]! * sc + this.shift[ia]! - sa : 0;
      cj = mask & (1 << ob) ? lv[ob]! * sc + this.shift[ib]! - sb : 0;
    } else {
      ci = mask & (1 << oa) ? lv[oa]! * sc : 0;
      cj = mask & (1 << ob) ? lv[ob]! * sc : 0;
    }
    if (!arcFromCenter(sa, sb, ea, eb, ci, cj, cw, out)) {
      this.say(R.arcInvalid, "error", line, "arc centre is at the start point");
      this.markNotEvaluated(line);
      return;
    }
    // [NIST] 3.5.3.2: the end must be as far from the centre as the start (within the arc tolerance)
    const tolArc = this.arcTolerance(this.progInch);
    const diff = Math.abs(out[A_REND]! - out[A_R]!);
    if (diff > tolArc + 1e-12) {
      this.say(R.arcRadiusMismatch, "error", line,
        `start radius ${fmt(out[A_R]! / sc)} and end radius ${fmt(out[A_REND]! / sc)} differ by ${fmt(diff / sc)} (more than ${fmt(tolArc / sc)})`);
    }
  }
  const ca = out[A_CA]!, cb = out[A_CB]!, r = out[A_R]!, a0 = out[A_A0]!, sweep = out[A_SWEEP]!;
  const sc0 = pos[ic]!;
  const ec = tgt[ic]!;
  let dc = ec - sc0;
  if (dc !== dc) dc = this.inc[ic]!;
  const rs = r * sweep;
  const length = Math.sqrt(rs * rs + dc * dc);
  const np = known ? arcExtremes(ca, cb, r, a0, sweep, cw, this.pts) : 0;
  // a cut by the definition in `linear`; an arc in G18/G19 also counts by its lowest point
  const lim = this.safeZ + 1e-9;
  const sz = pos[2]!, ez = tgt[2]!;
  let cut = (sz === sz ? sz < lim : !this.zHome) || (ez === ez ? ez < lim : !this.zHome);
  if (!cut && this.plane !== 17) {
    const zi = this.plane === 18 ? 0 : 1;
    for (let k = 0; k < np; k++) if (this.pts[k * 2 + zi]! < lim) cut = true;
  }
  this.cutNow = cut;
  if (cut) this.cutting(line);
  else if (this.approach === 0) this.approach = line;
  this.mlen = length;
  this.account(line, K_ARC);
  if (!known) {
    this.say(R.arcStartUnknown, "warning", line, "arc from a position that is not known: its length is counted, it is not drawn");
    this.lastCut = cut;
    pos[0] = tgt[0]!;
    pos[1] = tgt[1]!;
    pos[2] = tgt[2]!;
    return;
  }
  if (cut && !this.lastCut) this.cutStart();
  this.lastCut = cut;
  // exact bounds: extremes inside the sweep, then the end point
  const p3 = this.tmp;
  for (let k = 0; k < np; k++) {
    p3[ia] = this.pts[k * 2]!;
    p3[ib] = this.pts[k * 2 + 1]!;
    p3[ic] = NaN;
    this.point(p3, cut);
  }
  this.point(tgt, cut);
  if (this.wantPath && !this.tpFull) {
    const nChords = chordCount(r, sweep, this.tol, MAX_CHORDS);
    const step = (cw ? -sweep : sweep) / nChords;
    const cs = Math.cos(step), sn = Math.sin(step);
    let ux = Math.cos(a0), uy = Math.sin(a0);
    // the chords share the arc's time evenly (account() set t0 and t1 to the whole arc's)
    const ta = this.t0, te = this.t1, dt = (te - ta) / nChords;
    for (let k = 1; k <= nChords; k++) {
      this.t0 = ta + dt * (k - 1);
      this.t1 = k === nChords ? te : ta + dt * k;
      if (k === nChords) {
        this.seg(line, K_ARC, tgt);
      } else {
        const nx = ux * cs - uy * sn;
        uy = ux * sn + uy * cs;
        ux = nx;
        p3[ia] = ca + r * ux;
        p3[ib] = cb + r * uy;
        p3[ic] = sc0 + (dc * k) / nChords;
        this.seg(line, K_ARC, p3);
      }
      pos[0] = this.lvx;
      pos[1] = this.lvy;
      pos[2] = this.lvz;
    }
  }
  pos[0] = tgt[0]!;
  pos[1] = tgt[1]!;
  pos[2] = tgt[2]!;
  this.zHome = false;
};
