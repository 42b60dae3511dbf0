/**
 * Reading a program's words, byte by byte: one pass over the bytes, a line at a time, each line's letters, numbers,
 * G and M codes, comments and flags put in the state's per-line fields; then the line goes to the block, to the flow
 * while a body is skipped, or to the tail after the end. All in the name of speed: char codes, int32 arithmetic for the
 * first 9 digits of a number, no string, object or regex per line.
 */
import { Engine } from "./state";
import * as codes from "./codes";

// imported constants copied into module constants (codes.ts says why)
const {
  F_BADCHAR, F_BADCODE, F_BADCOMMENT, F_BADWORD, F_BLOCKDEL, F_CODE, F_EXPR, F_KEYWORD, F_KWEXPR, F_OVERFLOW,
  F_PERCENT, F_TEXT, KW_EXPR, L_G, L_M, L_O, MAX_WORDS, SKIP_NONE, keywordAt, nameKey,
} = codes;

const P10 = new Float64Array(23);
for (let i = 0; i < 23; i++) P10[i] = Number(`1e${i}`);

declare module "./state" {
  interface Engine {
    run(): void;
  }
}

const pp = Engine.prototype;

pp.run = function (this: Engine): void {
  this.setup();
  const b = this.b;
  const n = this.n;
  const lv = this.lv;
  const gc = this.gc;
  const mc = this.mc;
  // a UTF-8 byte-order mark is not part of the first block
  let p = n >= 3 && b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0;
  let line = 0;
  while (p < n) {
    line++;
    const ls = p;
    let mask = 0;
    let dup = 0;
    let flags = 0;
    let gN = 0;
    let mN = 0;
    let cs = -1;
    let ce = -1;
    let kw = 0;
    let bad = -1;
    let first = true;
    let le = n;
    while (p < n) {
      let c = b[p]!;
      if (c === 10) {
        le = p;
        p++;
        break;
      }
      if (c === 13) {
        le = p;
        p++;
        if (p < n && b[p] === 10) p++;
        break;
      }
      if (c === 32 || c === 9) {
        p++;
        continue;
      }
      const L = (c | 32) - 97;
      if (L >= 0 && L < 26 && c < 128) {
        first = false;
        p++;
        const afterLetter = p;
        // number: sign, digits, point; spaces and tabs are allowed inside ([NIST] 3.3.1)
        while (p < n && ((c = b[p]!) === 32 || c === 9)) p++;
        let neg = false;
        if (p < n && (c === 45 || c === 43)) {
          neg = c === 45;
          p++;
        }
        let digits = 0;
        let dec = -1;
        // up to 9 digits in int32 arithmetic (exact, and cheaper than a chain of double multiply-adds)
        let im = 0;
        while (p < n) {
          c = b[p]!;
          const d = c - 48;
          if (d >= 0 && d <= 9) {
            if (digits === 9) break;
            im = (im * 10 + d) | 0;
            if (dec >= 0) dec++;
            digits++;
          } else if (c === 46 && dec < 0) {
            dec = 0;
          } else if (c !== 32 && c !== 9) {
            break;
          }
          p++;
        }
        let mant = im;
        // more digits: the same in doubles, keeping 17 significant digits and scaling by the rest
        if (digits === 9) {
          while (p < n) {
            c = b[p]!;
            const d = c - 48;
            if (d >= 0 && d <= 9) {
              if (mant < 1e17) {
                mant = mant * 10 + d;
                if (dec >= 0) dec++;
              } else if (dec < 0) {
                mant *= 10;
              }
              digits++;
            } else if (c === 46 && dec < 0) {
              dec = 0;
            } else if (c !== 32 && c !== 9) {
              break;
            }
            p++;
          }
        }
        const bit = 1 << L;
        if (digits === 0) {
          if (p === afterLetter && p < n) {
            const c2 = c | 32;
            if (c2 >= 97 && c2 <= 122) {
              // a letter followed by a letter: a keyword of macro or o-word syntax, or plain text ("GOO")
              let q = p + 1;
              while (q < n && (b[q]! | 32) >= 97 && (b[q]! | 32) <= 122) q++;
              const id = keywordAt(b, afterLetter - 1, q);
              if (id === 0) {
                flags |= F_TEXT;
                if (bad < 0) bad = afterLetter - 1;
              } else {
                flags |= id >= KW_EXPR ? F_KWEXPR : F_KEYWORD;
                if (kw === 0) kw = id;
              }
              p = q;
              continue;
            }
            if (L === L_O && c === 60) {
              // o<name>: a named subroutine label
              let q = p + 1;
              while (q < n && b[q] !== 62 && b[q] !== 10 && b[q] !== 13) q++;
              if (q < n && b[q] === 62) {
                if (mask & bit) dup |= bit;
                mask |= bit;
                lv[L] = nameKey(b, p + 1, q);
                p = q + 1;
                continue;
              }
            }
          }
          if (p < n && (c === 35 || c === 91)) {
            flags |= F_EXPR;
            if (L !== L_G && L !== L_M) {
              mask |= bit;
              lv[L] = NaN;
            }
          } else {
            flags |= F_BADWORD; // an address with no value
            if (bad < 0) bad = afterLetter - 1;
          }
          continue;
        }
        let v = dec > 0 ? (dec < 23 ? mant / P10[dec]! : mant / Math.pow(10, dec)) : mant;
        if (neg) v = -v;
        if (L === L_G) {
          if (gN < MAX_WORDS) {
            const code = Math.round(v * 10);
            if (code < 0 || code >= 1000 || Math.abs(v * 10 - code) > 1e-6) {
              flags |= F_BADCODE;
              gc[gN++] = -1 - Math.min(1e9, Math.abs(Math.round(v * 1000)));
            } else gc[gN++] = code;
          } else flags |= F_OVERFLOW;
        } else if (L === L_M) {
          if (mN < MAX_WORDS) {
            if (v < 0 || v >= 100 || v !== Math.floor(v)) {
              flags |= F_BADCODE;
              mc[mN++] = -1;
            } else mc[mN++] = v;
          } else flags |= F_OVERFLOW;
        } else {
          if (mask & bit) dup |= bit;
          mask |= bit;
          lv[L] = v;
        }
        continue;
      }
      if (c === 40) {
        // comment: to ")" on the same line
        const s = p + 1;
        p++;
        while (p < n && (c = b[p]!) !== 41 && c !== 10 && c !== 13) p++;
        if (cs < 0) {
          cs = s;
          ce = p;
        }
        if (p < n && b[p] === 41) p++;
        else flags |= F_BADCOMMENT;
        continue;
      }
      if (c === 59) {
        const s = p + 1;
        while (p < n && (c = b[p]!) !== 10 && c !== 13) p++;
        if (cs < 0) {
          cs = s;
          ce = p;
        }
        continue;
      }
      if (c === 47 && first) flags |= F_BLOCKDEL;
      else if (c === 37) flags |= F_PERCENT;
      else if (c === 35 || c === 91 || c === 93 || c === 61 || c === 60 || c === 62) flags |= F_EXPR;
      else if (c > 32) {
        flags |= F_BADCHAR; // a number with no letter, or a character that belongs to no word
        if (bad < 0) bad = p;
      }
      first = false;
      p++;
    }
    this.line = line;
    this.ls = ls;
    this.le = le;
    this.mask = mask;
    this.dup = dup;
    this.flags = flags;
    this.gN = gN;
    this.mN = mN;
    this.cs = cs;
    this.ce = ce;
    this.kw = kw;
    this.bad = bad;
    // code lines are counted on the pass through the file, not again inside a subprogram call
    if (this.stack.length === 0 && (mask !== 0 || gN !== 0 || mN !== 0 || (flags & F_CODE) !== 0)) this.codeLines++;
    if (this.tail) this.tailLine();
    else if (this.skipKind !== SKIP_NONE) this.skipLine();
    else this.exec();
    if (this.jump >= 0) {
      p = this.jump;
      line = this.jumpLine;
      this.jump = -1;
    }
  }
  this.finish(line);
};
