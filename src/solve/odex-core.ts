/**
 * ODEX (Hairer & Wanner's extrapolated explicit midpoint rule with dense output), the core loop
 * of the odex 2.0.4 package (a port of Hairer's odex.f) carried over statement for statement,
 * with three changes that matter at scale:
 *
 * - Dense output in O(n) a sample. The package's interpolant, asked for one component, scans
 *   the list of dense components to find it (O(n) a component, O(n²) a full sample: 87 % of a
 *   10 000-chamber explicit run). Here every component is dense and `denseInto` evaluates the
 *   whole state in one pass.
 * - No allocation a call: the state, the stages and the extrapolation table live in
 *   Float64Arrays made once per solve; the rhs writes into a view of the stage buffer instead
 *   of returning a fresh array, and no copy of y is made for the step callback.
 * - Only the parts plenum uses: dense output is always on (step-size sequence 4), scalar
 *   relative and vector absolute tolerance.
 *
 * Arithmetic is unchanged, expression for expression (the same `Math.pow` calls, the same
 * order of operations), so results are identical to the package's to the last bit;
 * `test/solve/odex-core.test.ts` runs both on the same problems and compares every accepted
 * step, state and dense value. Entries the package leaves `undefined` until written start as
 * NaN here, which behaves the same in arithmetic and comparisons.
 *
 * References: Hairer, Nørsett & Wanner, Solving Ordinary Differential Equations I, 2nd ed.,
 * Springer 1993, §II.9 (ODEX and its dense output); odex 2.0.4 (BSD 2-clause), whose notice
 * follows.
 *
 * Copyright (c) 2016 Colin Smith. All rights reserved.
 * Redistribution and use in source and binary forms, with or without modification, are permitted
 * provided that the following conditions are met:
 * 1. Redistributions of source code must retain the above copyright notice, this list of
 *    conditions and the following disclaimer.
 * 2. Redistributions in binary form must reproduce the above copyright notice, this list of
 *    conditions and the following disclaimer in the documentation and/or other materials
 *    provided with the distribution.
 * THIS SOFTWARE IS PROVIDED BY THE COPYRIGHT HOLDERS AND CONTRIBUTORS "AS IS" AND ANY EXPRESS OR
 * IMPLIED WARRANTIES, INCLUDING, BUT NOT LIMITED TO, THE IMPLIED WARRANTIES OF MERCHANTABILITY AND
 * FITNESS FOR A PARTICULAR PURPOSE ARE DISCLAIMED. IN NO EVENT SHALL THE COPYRIGHT HOLDER OR
 * CONTRIBUTORS BE LIABLE FOR ANY DIRECT, INDIRECT, INCIDENTAL, SPECIAL, EXEMPLARY, OR CONSEQUENTIAL
 * DAMAGES (INCLUDING, BUT NOT LIMITED TO, PROCUREMENT OF SUBSTITUTE GOODS OR SERVICES; LOSS OF USE,
 * DATA, OR PROFITS; OR BUSINESS INTERRUPTION) HOWEVER CAUSED AND ON ANY THEORY OF LIABILITY,
 * WHETHER IN CONTRACT, STRICT LIABILITY, OR TORT (INCLUDING NEGLIGENCE OR OTHERWISE) ARISING IN
 * ANY WAY OUT OF THE USE OF THIS SOFTWARE, EVEN IF ADVISED OF THE POSSIBILITY OF SUCH DAMAGE.
 */

/** Writes y'(x) into dydt (both 0-based, length n). May throw to abandon the run. */
export type OdexRhs = (x: number, y: Float64Array, dydt: Float64Array) => void;

/**
 * Called after every accepted step (and once at the start with nr = 1, xOld = x). `y` is the
 * solver's own state (0-based view): read it, do not keep or modify it. `dense` is valid on
 * [xOld, x] until the callback returns. Return false to stop.
 */
export type OdexOutput = (nr: number, xOld: number, x: number, y: Float64Array, dense: OdexDense | null) => boolean | void;

export interface OdexDense {
  /** All components at x into out (0-based, length n): O(n). */
  into(x: number, out: Float64Array): void;
  /** Component c (0-based) at x. */
  at(c: number, x: number): number;
}

export type OdexOutcome = 'converged' | 'max-steps' | 'early-return';

export interface OdexSettings {
  maxSteps: number;
  initialStepSize: number;
  /** 0: the whole interval. */
  maxStepSize: number;
  /** IWORK(4): stability checks in a line of the table (0 switches the check off). */
  stabilityCheckCount: number;
  rtol: number;
  atol: Float64Array;
}

export interface OdexRun {
  outcome: OdexOutcome;
  nStep: number;
  nAccept: number;
  nReject: number;
  nEval: number;
}

const U_ROUND = 2.3e-16;
const KM = 9;                  // maxExtrapolationColumns
const N_SEQ = 4;               // step-size sequence for dense output
const STABILITY_LINES = 2;
const DEGREE = 4;              // interpolationFormulaDegree
const REDUCTION = 0.5;
const FAC1 = 0.02, FAC2 = 4.0, FAC3 = 0.8, FAC4 = 0.9;
const SAFE1 = 0.65, SAFE2 = 0.94;

function nanArray(n: number): Float64Array {
  return new Float64Array(n).fill(Number.NaN);
}

/** 1-based rows 1..r of 1-based arrays of length c, stored flat: row i at (i·(c+1)). */
class Table {
  readonly a: Float64Array;
  readonly stride: number;
  constructor(r: number, c: number) {
    this.stride = c + 1;
    this.a = nanArray((r + 1) * this.stride);
  }
}

/**
 * Integrates y' = f from x to xEnd with dense output, calling solOut at the start and after
 * every accepted step; y0 is copied. Same step sequence and numbers as odex 2.0.4's
 * Solver.solve with denseOutput = true and default settings otherwise.
 */
export function odexSolve(n: number, f: OdexRhs, x: number, y0: Float64Array, xEnd: number, solOut: OdexOutput, s: OdexSettings): OdexRun {
  const km = KM;
  const nSeq = N_SEQ;
  const nrd = n;
  // 1-based buffers with a 0-based view for the rhs and the callback
  const y = nanArray(n + 1);
  for (let i = 0; i < n; i++) y[i + 1] = y0[i];
  const dz = nanArray(n + 1);
  const yh1 = nanArray(n + 1);
  const yh2 = nanArray(n + 1);
  const dy = nanArray(n + 1);
  const yV = y.subarray(1), dzV = dz.subarray(1), yh1V = yh1.subarray(1), yh2V = yh2.subarray(1), dyV = dy.subarray(1);
  if (s.maxSteps <= 0) throw new Error('maxSteps must be positive');
  const hMax = Math.abs(s.maxStepSize || xEnd - x);
  const lfSafe = 2 * km * km + km;
  const aTol = s.atol; // 0-based: aTol[i - 1]
  const rTol = s.rtol;
  let nEval = 0, nStep = 0, nAccept = 0, nReject = 0;
  const ncom = Math.max(1, (2 * km + 5) * nrd);
  const dens = nanArray(ncom + 1);
  const fSafeT = new Table(lfSafe, nrd);
  const fSafe = fSafeT.a, fs = fSafeT.stride;
  const ySafeT = new Table(km, nrd);
  const ySafe = ySafeT.a, ys = ySafeT.stride;
  const tT = new Table(km, n);
  const t = tT.a, ts = tT.stride;
  const hh = nanArray(km + 1);
  const interpA = nanArray(31);

  // COMMON /CONTEX/
  let xOldd = Number.NaN;
  let hhh = Number.NaN;
  let kmit = 0;

  const denseAt = (i: number, xq: number): number => {
    // i is 1-based
    const theta = (xq - xOldd) / hhh;
    const theta1 = 1 - theta;
    const phthet = dens[i] + theta * (dens[nrd + i] + theta1 * (dens[2 * nrd + i] * theta + dens[3 * nrd + i] * theta1));
    if (kmit < 0) return phthet;
    const thetah = theta - 0.5;
    let ret = dens[nrd * (kmit + 4) + i];
    for (let im = kmit; im >= 1; --im) ret = dens[nrd * (im + 3) + i] + ret * thetah / im;
    return phthet + Math.pow((theta * theta1), 2) * ret;
  };
  const dense: OdexDense = {
    at: (c, xq) => denseAt(c + 1, xq),
    into: (xq, out) => {
      const theta = (xq - xOldd) / hhh;
      const theta1 = 1 - theta;
      const thetah = theta - 0.5;
      const w2 = Math.pow((theta * theta1), 2);
      const imit = kmit;
      for (let i = 1; i <= nrd; i++) {
        const phthet = dens[i] + theta * (dens[nrd + i] + theta1 * (dens[2 * nrd + i] * theta + dens[3 * nrd + i] * theta1));
        if (imit < 0) { out[i - 1] = phthet; continue; }
        let ret = dens[nrd * (imit + 4) + i];
        for (let im = imit; im >= 1; --im) ret = dens[nrd * (im + 3) + i] + ret * thetah / im;
        out[i - 1] = phthet + w2 * ret;
      }
    },
  };

  // preparation
  const nj = new Float64Array(km + 1);
  for (let i = 1; i <= km; ++i) nj[i] = 4 * i - 2; // sequence 4
  const a = nanArray(km + 1);
  a[1] = 1 + nj[1];
  for (let i = 2; i <= km; ++i) a[i] = a[i - 1] + nj[i];
  const scal = nanArray(n + 1);
  for (let i = 1; i <= n; ++i) scal[i] = aTol[i - 1] + rTol + Math.abs(y[i]);
  const posneg = xEnd - x >= 0 ? 1 : -1;
  let k = Math.max(2, Math.min(km - 1, Math.floor(-(Math.log(rTol + 1e-40) / Math.LN10) * 0.6 + 1.5)));
  let h = Math.max(Math.abs(s.initialStepSize), 1e-4);
  h = posneg * Math.min(h, hMax, Math.abs(xEnd - x) / 2);
  const iPoint = nanArray(km + 2);
  const errfac = nanArray(2 * km + 1);
  let xOld = x;
  let iPt = 0;
  iPoint[1] = 0;
  for (let i = 1; i <= km; ++i) {
    let njAdd = 4 * i - 2;
    if (nj[i] > njAdd) ++njAdd;
    iPoint[i + 1] = iPoint[i] + njAdd;
  }
  for (let mu = 1; mu <= 2 * km; ++mu) {
    const errx = Math.sqrt(mu / (mu + 4)) * 0.5;
    let prod = Math.pow((1 / (mu + 4)), 2);
    for (let j = 1; j <= mu; ++j) prod *= errx / j;
    errfac[mu] = prod;
  }
  const done = (outcome: OdexOutcome): OdexRun => ({ outcome, nStep, nAccept, nReject, nEval });
  if (solOut(nAccept + 1, xOld, x, yV, null) === false) return done('early-return');

  let err = 0;
  let errOld = 1e10;
  let hoptde = posneg * hMax;
  const w = nanArray(km + 1);
  w[1] = 0;
  let reject = false;
  let last = false;
  let atov = false;
  let kc = 0;

  /** The j-th line of the extrapolation table and an estimate of the optimal step size. */
  const midex = (j: number): void => {
    const hj = h / nj[j];
    for (let i = 1; i <= n; ++i) {
      yh1[i] = y[i];
      yh2[i] = y[i] + hj * dz[i];
    }
    const m = nj[j] - 1;
    const njMid = (nj[j] / 2) | 0;
    for (let mm = 1; mm <= m; ++mm) {
      if (mm === njMid) {
        const r = j * ys;
        for (let i = 1; i <= nrd; ++i) ySafe[r + i] = yh2[i];
      }
      f(x + hj * mm, yh2V, dyV);
      if (Math.abs(mm - njMid) <= 2 * j - 1) {
        ++iPt;
        const r = iPt * fs;
        for (let i = 1; i <= nrd; ++i) fSafe[r + i] = dy[i];
      }
      for (let i = 1; i <= n; ++i) {
        const ysv = yh1[i];
        yh1[i] = yh2[i];
        yh2[i] = ysv + 2 * hj * dy[i];
      }
      if (mm <= s.stabilityCheckCount && j <= STABILITY_LINES) {
        let del1 = 0;
        for (let i = 1; i <= n; ++i) del1 += Math.pow((dz[i] / scal[i]), 2);
        let del2 = 0;
        for (let i = 1; i <= n; ++i) del2 += Math.pow(((dy[i] - dz[i]) / scal[i]), 2);
        const quot = del2 / Math.max(U_ROUND, del1);
        if (quot > 4) {
          ++nEval;
          atov = true;
          h *= REDUCTION;
          reject = true;
          return;
        }
      }
    }
    // final smoothing step
    f(x + h, yh2V, dyV);
    if (njMid <= 2 * j - 1) {
      ++iPt;
      const r = iPt * fs;
      for (let i = 1; i <= nrd; ++i) fSafe[r + i] = dy[i];
    }
    const rj = j * ts;
    for (let i = 1; i <= n; ++i) t[rj + i] = (yh1[i] + yh2[i] + hj * dy[i]) / 2;
    nEval += nj[j];
    if (j === 1) return;
    const dblenj = nj[j];
    let fac: number;
    for (let l = j; l > 1; --l) {
      fac = Math.pow((dblenj / nj[l - 1]), 2) - 1;
      const rl = l * ts, rl1 = (l - 1) * ts;
      for (let i = 1; i <= n; ++i) t[rl1 + i] = t[rl + i] + (t[rl + i] - t[rl1 + i]) / fac;
    }
    err = 0;
    for (let i = 1; i <= n; ++i) {
      const t1i = Math.max(Math.abs(y[i]), Math.abs(t[ts + i]));
      scal[i] = aTol[i - 1] + rTol * t1i;
      err += Math.pow(((t[ts + i] - t[2 * ts + i]) / scal[i]), 2);
    }
    err = Math.sqrt(err / n);
    if (err * U_ROUND >= 1 || (j > 2 && err >= errOld)) {
      atov = true;
      h *= REDUCTION;
      reject = true;
      return;
    }
    errOld = Math.max(4 * err, 1);
    const exp0 = 1 / (2 * j - 1);
    const facMin = Math.pow(FAC1, exp0);
    fac = Math.min(FAC2 / facMin, Math.max(facMin, Math.pow((err / SAFE1), exp0) / SAFE2));
    fac = 1 / fac;
    hh[j] = Math.min(Math.abs(h) * fac, hMax);
    w[j] = a[j] / hh[j];
  };

  /** Coefficients of the interpolation formula, in place in dens. */
  const interp = (imit: number): void => {
    const ia = interpA;
    const yd = dens;
    for (let i = 1; i <= nrd; ++i) {
      const y0i = yd[i];
      const y1 = yd[2 * nrd + i];
      const yp0 = yd[nrd + i];
      const yp1 = yd[3 * nrd + i];
      const yDiff = y1 - y0i;
      const aspl = -yp1 + yDiff;
      const bspl = yp0 - yDiff;
      yd[nrd + i] = yDiff;
      yd[2 * nrd + i] = aspl;
      yd[3 * nrd + i] = bspl;
      if (imit < 0) continue;
      const ph0 = (y0i + y1) * 0.5 + 0.125 * (aspl + bspl);
      const ph1 = yDiff + (aspl - bspl) * 0.25;
      const ph2 = -(yp0 - yp1);
      const ph3 = 6 * (bspl - aspl);
      if (imit >= 1) {
        ia[1] = 16 * (yd[5 * nrd + i] - ph1);
        if (imit >= 3) {
          ia[3] = 16 * (yd[7 * nrd + i] - ph3 + 3 * ia[1]);
          if (imit >= 5) {
            for (let im = 5; im <= imit; im += 2) {
              const fac1 = im * (im - 1) / 2;
              const fac2 = fac1 * (im - 2) * (im - 3) * 2;
              ia[im] = 16 * (yd[(im + 4) * nrd + i] + fac1 * ia[im - 2] - fac2 * ia[im - 4]);
            }
          }
        }
      }
      ia[0] = (yd[4 * nrd + i] - ph0) * 16;
      if (imit >= 2) {
        ia[2] = (yd[nrd * 6 + i] - ph2 + ia[0]) * 16;
        if (imit >= 4) {
          for (let im = 4; im <= imit; im += 2) {
            const fac1 = im * (im - 1) / 2;
            const fac2 = im * (im - 1) * (im - 2) * (im - 3);
            ia[im] = (yd[nrd * (im + 4) + i] + ia[im - 2] * fac1 - ia[im - 4] * fac2) * 16;
          }
        }
      }
      for (let im = 0; im <= imit; ++im) yd[nrd * (im + 4) + i] = ia[im];
    }
  };

  /** Accepts the step; false when the callback stopped the integration. */
  const acceptStep = (): boolean => {
    xOld = x;
    x += h;
    kmit = 2 * kc - DEGREE + 1;
    for (let i = 1; i <= nrd; ++i) dens[i] = y[i];
    xOldd = xOld;
    hhh = h;
    for (let i = 1; i <= nrd; ++i) dens[nrd + i] = h * dz[i];
    let kln = 2 * nrd;
    for (let i = 1; i <= nrd; ++i) dens[kln + i] = t[ts + i];
    // solution at the mid-point
    for (let j = 2; j <= kc; ++j) {
      const dblenj = nj[j];
      for (let l = j; l >= 2; --l) {
        const factor = Math.pow((dblenj / nj[l - 1]), 2) - 1;
        const rl = l * ys, rl1 = (l - 1) * ys;
        for (let i = 1; i <= nrd; ++i) ySafe[rl1 + i] = ySafe[rl + i] + (ySafe[rl + i] - ySafe[rl1 + i]) / factor;
      }
    }
    let krn = 4 * nrd;
    for (let i = 1; i <= nrd; ++i) dens[krn + i] = ySafe[ys + i];
    // first derivative at the right end
    for (let i = 1; i <= n; ++i) yh1[i] = t[ts + i];
    f(x, yh1V, yh2V);
    krn = 3 * nrd;
    for (let i = 1; i <= nrd; ++i) dens[krn + i] = yh2[i] * h;
    for (let kmi = 1; kmi <= kmit; ++kmi) {
      // kmi-th derivative at the mid-point
      const kbeg = (kmi + 1) / 2 | 0;
      for (let kk = kbeg; kk <= kc; ++kk) {
        const facnj = Math.pow((nj[kk] / 2), (kmi - 1));
        iPt = iPoint[kk + 1] - 2 * kk + kmi;
        const rk = kk * ys, rp = iPt * fs;
        for (let i = 1; i <= nrd; ++i) ySafe[rk + i] = fSafe[rp + i] * facnj;
      }
      for (let j = kbeg + 1; j <= kc; ++j) {
        const dblenj = nj[j];
        for (let l = j; l >= kbeg + 1; --l) {
          const factor = Math.pow((dblenj / nj[l - 1]), 2) - 1;
          const rl = l * ys, rl1 = (l - 1) * ys;
          for (let i = 1; i <= nrd; ++i) ySafe[rl1 + i] = ySafe[rl + i] + (ySafe[rl + i] - ySafe[rl1 + i]) / factor;
        }
      }
      krn = (kmi + 4) * nrd;
      const rb = kbeg * ys;
      for (let i = 1; i <= nrd; ++i) dens[krn + i] = ySafe[rb + i] * h;
      if (kmi === kmit) continue;
      // differences
      for (let kk = (kmi + 2) / 2 | 0; kk <= kc; ++kk) {
        const lbeg = iPoint[kk + 1];
        let lend = iPoint[kk] + kmi + 1;
        if (kmi === 1 && nSeq === 4) lend += 2;
        let l: number;
        for (l = lbeg; l >= lend; l -= 2) {
          const rl = l * fs, rl2 = (l - 2) * fs;
          for (let i = 1; i <= nrd; ++i) fSafe[rl + i] -= fSafe[rl2 + i];
        }
        if (kmi === 1 && nSeq === 4) {
          l = lend - 2;
          const rl = l * fs;
          for (let i = 1; i <= nrd; ++i) fSafe[rl + i] -= dz[i];
        }
      }
      for (let kk = (kmi + 2) / 2 | 0; kk <= kc; ++kk) {
        const lbeg = iPoint[kk + 1] - 1;
        const lend = iPoint[kk] + kmi + 2;
        for (let l = lbeg; l >= lend; l -= 2) {
          const rl = l * fs, rl2 = (l - 2) * fs;
          for (let i = 1; i <= nrd; ++i) fSafe[rl + i] -= fSafe[rl2 + i];
        }
      }
    }
    interp(kmit);
    // estimate of the interpolation error
    if (kmit >= 1) {
      let errint = 0;
      for (let i = 1; i <= nrd; ++i) errint += Math.pow((dens[(kmit + 4) * nrd + i] / scal[i]), 2);
      errint = Math.sqrt(errint / nrd) * errfac[kmit];
      hoptde = h / Math.max(Math.pow(errint, (1 / (kmit + 4))), 0.01);
      if (errint > 10) {
        h = hoptde;
        x = xOld;
        ++nReject;
        reject = true;
        return true;
      }
    }
    for (let i = 1; i <= n; ++i) dz[i] = yh2[i];
    for (let i = 1; i <= n; ++i) y[i] = t[ts + i];
    ++nAccept;
    if (solOut(nAccept + 1, xOld, x, yV, dense) === false) return false;
    // optimal order
    let kopt: number;
    if (kc === 2) {
      kopt = Math.min(3, km - 1);
      if (reject) kopt = 2;
    } else if (kc <= k) {
      kopt = kc;
      if (w[kc - 1] < w[kc] * FAC3) kopt = kc - 1;
      if (w[kc] < w[kc - 1] * FAC4) kopt = Math.min(kc + 1, km - 1);
    } else {
      kopt = kc - 1;
      if (kc > 3 && w[kc - 2] < w[kc - 1] * FAC3) kopt = kc - 2;
      if (w[kc] < w[kopt] * FAC4) kopt = Math.min(kc, km - 1);
    }
    if (reject) {
      k = Math.min(kopt, kc);
      h = posneg * Math.min(Math.abs(h), Math.abs(hh[k]));
      reject = false;
      return true;
    }
    if (kopt <= kc) {
      h = hh[kopt];
    } else if (kc < k && w[kc] < w[kc - 1] * FAC4) {
      h = hh[kc] * a[kopt + 1] / a[kc];
    } else {
      h = hh[kc] * a[kopt] / a[kc];
    }
    k = kopt;
    h = posneg * Math.abs(h);
    return true;
  };

  type State = 'start' | 'basic' | 'convergence' | 'hope' | 'accept' | 'reject';
  let state: State = 'start';
  for (;;) {
    switch (state) {
      case 'start': {
        atov = false;
        if (0.1 * Math.abs(xEnd - x) <= Math.abs(x) * U_ROUND) return done('converged');
        h = posneg * Math.min(Math.abs(h), Math.abs(xEnd - x), hMax, Math.abs(hoptde));
        if ((x + 1.01 * h - xEnd) * posneg > 0) {
          h = xEnd - x;
          last = true;
        }
        if (nStep === 0) {
          f(x, yV, dzV);
          ++nEval;
        }
        if (nStep === 0 || last) {
          iPt = 0;
          ++nStep;
          let next: State = 'hope';
          for (let j = 1; j <= k; ++j) {
            kc = j;
            midex(j);
            if (atov) { next = 'start'; break; }
            if (j > 1 && err <= 1) { next = 'accept'; break; }
          }
          state = next;
          continue;
        }
        state = 'basic';
        continue;
      }
      case 'basic': {
        iPt = 0;
        ++nStep;
        if (nStep >= s.maxSteps) return done('max-steps');
        kc = k - 1;
        let aborted = false;
        for (let j = 1; j <= kc; ++j) {
          midex(j);
          if (atov) { aborted = true; break; }
        }
        if (aborted) { state = 'start'; continue; }
        if (k === 2 || reject) state = 'convergence';
        else if (err <= 1) state = 'accept';
        else if (err > Math.pow(((nj[k + 1] * nj[k]) / 4), 2)) state = 'reject';
        else state = 'convergence';
        continue;
      }
      case 'convergence':
        midex(k);
        if (atov) { state = 'start'; continue; }
        kc = k;
        state = err <= 1 ? 'accept' : 'hope';
        continue;
      case 'hope':
        if (err > Math.pow((nj[k + 1] / 2), 2)) { state = 'reject'; continue; }
        kc = k + 1;
        midex(kc);
        state = atov ? 'start' : err > 1 ? 'reject' : 'accept';
        continue;
      case 'accept':
        if (!acceptStep()) return done('early-return');
        state = 'start';
        continue;
      case 'reject':
        k = Math.min(k, kc, km - 1);
        if (k > 2 && w[k - 1] < w[k] * FAC3) k -= 1;
        ++nReject;
        h = posneg * hh[k];
        reject = true;
        state = 'basic';
        continue;
    }
  }
}
