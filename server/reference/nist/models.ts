/**
 * The model functions of the 27 NIST StRD nonlinear-regression datasets, as printed in each
 * file's "Model:" block, with hand-derived partial derivatives ∂f/∂b (checked against finite
 * differences in test/reference/nist/models.test.ts).
 *
 * `f(b, x, x2, g)` returns the model value at one observation in double and, when g is given,
 * fills g[k] = ∂f/∂b_k. `fDd(b, x, x2)` is the same model in double-double from double-double
 * data: the residuals y − f are formed from it, because some certified sums of squares (Lanczos1)
 * sit below what double evaluation can resolve; the Jacobian needs only relative accuracy and
 * stays in double. Nelson's response is log(y) (its model is written for log[y]).
 */
import {
  ONE,
  PI,
  add,
  addNum,
  atan,
  div,
  exp,
  fromNumber,
  log,
  mul,
  mulNum,
  neg,
  pow,
  sinCos,
  sqr,
  sqrt,
  sub,
} from './double-double.js';
import type { Dd } from './double-double.js';

export interface StrdModel {
  readonly n: number;
  /** Transform applied to the recorded response before fitting (Nelson fits log y). */
  readonly response?: (y: number) => number;
  readonly responseDd?: (y: Dd) => Dd;
  f(b: Float64Array, x: number, x2: number, g: Float64Array | null): number;
  fDd(b: Float64Array, x: Dd, x2: Dd): Dd;
}

const TWO_PI = 2 * Math.PI;
const TWO_PI_DD = mulNum(PI, 2);

/** b·x for a double parameter and double-double datum. */
function bx(b: number, x: Dd): Dd {
  return mulNum(x, b);
}

// y = b1*(1-exp[-b2*x])
const exponentialRise: StrdModel = {
  n: 2,
  f(b, x, _x2, g) {
    const e = Math.exp(-b[1] * x);
    if (g) {
      g[0] = 1 - e;
      g[1] = b[0] * x * e;
    }
    return b[0] * (1 - e);
  },
  fDd(b, x) {
    return mulNum(sub(ONE, exp(neg(bx(b[1], x)))), b[0]);
  },
};

// y = exp[-b1*x]/(b2+b3*x)
const chwirut: StrdModel = {
  n: 3,
  f(b, x, _x2, g) {
    const e = Math.exp(-b[0] * x);
    const d = b[1] + b[2] * x;
    if (g) {
      g[0] = (-x * e) / d;
      g[1] = -e / (d * d);
      g[2] = (-x * e) / (d * d);
    }
    return e / d;
  },
  fDd(b, x) {
    return div(exp(neg(bx(b[0], x))), addNum(bx(b[2], x), b[1]));
  },
};

/** (c0 + c1 x + … + c_k x^k) / (1 + d1 x + … + d_k x^k) with b = [c0..ck, d1..dk]. */
function rational(k: number): StrdModel {
  return {
    n: 2 * k + 1,
    f(b, x, _x2, g) {
      let num = 0;
      let den = 1;
      let xp = 1;
      for (let i = 0; i <= k; i++) {
        num += b[i] * xp;
        if (i > 0) den += b[k + i] * xp;
        xp *= x;
      }
      if (g) {
        xp = 1;
        for (let i = 0; i <= k; i++) {
          g[i] = xp / den;
          if (i > 0) g[k + i] = (-num * xp) / (den * den);
          xp *= x;
        }
      }
      return num / den;
    },
    fDd(b, x) {
      // Horner from the top coefficient down.
      let num = fromNumber(b[k]);
      let den = fromNumber(b[2 * k]);
      for (let i = k - 1; i >= 0; i--) {
        num = addNum(mul(num, x), b[i]);
        den = addNum(mul(den, x), i === 0 ? 1 : b[k + i]);
      }
      return div(num, den);
    },
  };
}

// y = Σ b_{2k-1}*exp(-b_{2k}*x), three terms
const lanczos: StrdModel = {
  n: 6,
  f(b, x, _x2, g) {
    let s = 0;
    for (let t = 0; t < 3; t++) {
      const e = Math.exp(-b[2 * t + 1] * x);
      s += b[2 * t] * e;
      if (g) {
        g[2 * t] = e;
        g[2 * t + 1] = -b[2 * t] * x * e;
      }
    }
    return s;
  },
  fDd(b, x) {
    let s = mulNum(exp(neg(bx(b[1], x))), b[0]);
    for (let t = 1; t < 3; t++) s = add(s, mulNum(exp(neg(bx(b[2 * t + 1], x))), b[2 * t]));
    return s;
  },
};

// y = b1*exp(-b2*x) + b3*exp(-(x-b4)^2/b5^2) + b6*exp(-(x-b7)^2/b8^2)
const gauss: StrdModel = {
  n: 8,
  f(b, x, _x2, g) {
    const e = Math.exp(-b[1] * x);
    let s = b[0] * e;
    if (g) {
      g[0] = e;
      g[1] = -b[0] * x * e;
    }
    for (const o of [2, 5]) {
      const u = x - b[o + 1];
      const w = b[o + 2];
      const q = Math.exp(-(u * u) / (w * w));
      s += b[o] * q;
      if (g) {
        g[o] = q;
        g[o + 1] = (b[o] * q * 2 * u) / (w * w);
        g[o + 2] = (b[o] * q * 2 * u * u) / (w * w * w);
      }
    }
    return s;
  },
  fDd(b, x) {
    let s = mulNum(exp(neg(bx(b[1], x))), b[0]);
    for (const o of [2, 5]) {
      const u = addNum(x, -b[o + 1]);
      s = add(s, mulNum(exp(neg(div(sqr(u), sqr(fromNumber(b[o + 2]))))), b[o]));
    }
    return s;
  },
};

export const STRD_MODELS: Readonly<Record<string, StrdModel>> = {
  Misra1a: exponentialRise,
  BoxBOD: exponentialRise,
  Chwirut1: chwirut,
  Chwirut2: chwirut,
  Kirby2: rational(2),
  Hahn1: rational(3),
  Thurber: rational(3),
  Lanczos1: lanczos,
  Lanczos2: lanczos,
  Lanczos3: lanczos,
  Gauss1: gauss,
  Gauss2: gauss,
  Gauss3: gauss,
  // y = b1*x**b2
  DanWood: {
    n: 2,
    f(b, x, _x2, g) {
      const p = Math.pow(x, b[1]);
      if (g) {
        g[0] = p;
        g[1] = b[0] * p * Math.log(x);
      }
      return b[0] * p;
    },
    fDd(b, x) {
      return mulNum(pow(x, fromNumber(b[1])), b[0]);
    },
  },
  // y = b1 * (1-(1+b2*x/2)**(-2))
  Misra1b: {
    n: 2,
    f(b, x, _x2, g) {
      const u = 1 + (b[1] * x) / 2;
      if (g) {
        g[0] = 1 - 1 / (u * u);
        g[1] = (b[0] * x) / (u * u * u);
      }
      return b[0] * (1 - 1 / (u * u));
    },
    fDd(b, x) {
      const u = addNum(mulNum(bx(b[1], x), 0.5), 1);
      return mulNum(sub(ONE, div(ONE, sqr(u))), b[0]);
    },
  },
  // y = b1 * (1-(1+2*b2*x)**(-.5))
  Misra1c: {
    n: 2,
    f(b, x, _x2, g) {
      const u = 1 + 2 * b[1] * x;
      const s = 1 / Math.sqrt(u);
      if (g) {
        g[0] = 1 - s;
        g[1] = (b[0] * x * s) / u;
      }
      return b[0] * (1 - s);
    },
    fDd(b, x) {
      const u = addNum(mulNum(bx(b[1], x), 2), 1);
      return mulNum(sub(ONE, div(ONE, sqrt(u))), b[0]);
    },
  },
  // y = b1*b2*x*((1+b2*x)**(-1))
  Misra1d: {
    n: 2,
    f(b, x, _x2, g) {
      const u = 1 + b[1] * x;
      if (g) {
        g[0] = (b[1] * x) / u;
        g[1] = (b[0] * x) / (u * u);
      }
      return (b[0] * b[1] * x) / u;
    },
    fDd(b, x) {
      const bx1 = bx(b[1], x);
      return div(mulNum(bx1, b[0]), addNum(bx1, 1));
    },
  },
  // y = b1*(x**2+x*b2) / (x**2+x*b3+b4)
  MGH09: {
    n: 4,
    f(b, x, _x2, g) {
      const num = x * x + x * b[1];
      const den = x * x + x * b[2] + b[3];
      if (g) {
        g[0] = num / den;
        g[1] = (b[0] * x) / den;
        g[2] = (-b[0] * num * x) / (den * den);
        g[3] = (-b[0] * num) / (den * den);
      }
      return (b[0] * num) / den;
    },
    fDd(b, x) {
      const x2 = sqr(x);
      const num = add(x2, bx(b[1], x));
      const den = addNum(add(x2, bx(b[2], x)), b[3]);
      return mulNum(div(num, den), b[0]);
    },
  },
  // y = b1 * exp[b2/(x+b3)]
  MGH10: {
    n: 3,
    f(b, x, _x2, g) {
      const v = x + b[2];
      const e = Math.exp(b[1] / v);
      if (g) {
        g[0] = e;
        g[1] = (b[0] * e) / v;
        g[2] = (-b[0] * e * b[1]) / (v * v);
      }
      return b[0] * e;
    },
    fDd(b, x) {
      return mulNum(exp(div(fromNumber(b[1]), addNum(x, b[2]))), b[0]);
    },
  },
  // y = b1 + b2*exp[-x*b4] + b3*exp[-x*b5]
  MGH17: {
    n: 5,
    f(b, x, _x2, g) {
      const e4 = Math.exp(-x * b[3]);
      const e5 = Math.exp(-x * b[4]);
      if (g) {
        g[0] = 1;
        g[1] = e4;
        g[2] = e5;
        g[3] = -b[1] * x * e4;
        g[4] = -b[2] * x * e5;
      }
      return b[0] + b[1] * e4 + b[2] * e5;
    },
    fDd(b, x) {
      const e4 = mulNum(exp(neg(bx(b[3], x))), b[1]);
      const e5 = mulNum(exp(neg(bx(b[4], x))), b[2]);
      return addNum(add(e4, e5), b[0]);
    },
  },
  // y = (b1/b2) * exp[-0.5*((x-b3)/b2)**2]
  Eckerle4: {
    n: 3,
    f(b, x, _x2, g) {
      const z = (x - b[2]) / b[1];
      const e = Math.exp(-0.5 * z * z);
      if (g) {
        g[0] = e / b[1];
        g[1] = ((b[0] * e) / (b[1] * b[1])) * (z * z - 1);
        g[2] = ((b[0] * e) / (b[1] * b[1])) * z;
      }
      return (b[0] / b[1]) * e;
    },
    fDd(b, x) {
      const b2 = fromNumber(b[1]);
      const z = div(addNum(x, -b[2]), b2);
      return div(mulNum(exp(mulNum(sqr(z), -0.5)), b[0]), b2);
    },
  },
  // y = b1 / (1+exp[b2-b3*x])
  Rat42: {
    n: 3,
    f(b, x, _x2, g) {
      const e = Math.exp(b[1] - b[2] * x);
      const u = 1 + e;
      if (g) {
        g[0] = 1 / u;
        g[1] = (-b[0] * e) / (u * u);
        g[2] = (b[0] * x * e) / (u * u);
      }
      return b[0] / u;
    },
    fDd(b, x) {
      const u = addNum(exp(addNum(neg(bx(b[2], x)), b[1])), 1);
      return div(fromNumber(b[0]), u);
    },
  },
  // y = b1 / ((1+exp[b2-b3*x])**(1/b4))
  Rat43: {
    n: 4,
    f(b, x, _x2, g) {
      const e = Math.exp(b[1] - b[2] * x);
      const u = 1 + e;
      const p = Math.pow(u, -1 / b[3]);
      if (g) {
        g[0] = p;
        g[1] = (-b[0] * p * e) / (b[3] * u);
        g[2] = (b[0] * p * e * x) / (b[3] * u);
        g[3] = (b[0] * p * Math.log(u)) / (b[3] * b[3]);
      }
      return b[0] * p;
    },
    fDd(b, x) {
      const u = addNum(exp(addNum(neg(bx(b[2], x)), b[1])), 1);
      return mulNum(pow(u, div(fromNumber(-1), fromNumber(b[3]))), b[0]);
    },
  },
  // y = b1 * (b2+x)**(-1/b3)
  Bennett5: {
    n: 3,
    f(b, x, _x2, g) {
      const v = b[1] + x;
      const p = Math.pow(v, -1 / b[2]);
      if (g) {
        g[0] = p;
        g[1] = (-b[0] * p) / (b[2] * v);
        g[2] = (b[0] * p * Math.log(v)) / (b[2] * b[2]);
      }
      return b[0] * p;
    },
    fDd(b, x) {
      return mulNum(pow(addNum(x, b[1]), div(fromNumber(-1), fromNumber(b[2]))), b[0]);
    },
  },
  // log[y] = b1 - b2*x1 * exp[-b3*x2]
  Nelson: {
    n: 3,
    response: Math.log,
    responseDd: log,
    f(b, x1, x2, g) {
      const e = Math.exp(-b[2] * x2);
      if (g) {
        g[0] = 1;
        g[1] = -x1 * e;
        g[2] = b[1] * x1 * x2 * e;
      }
      return b[0] - b[1] * x1 * e;
    },
    fDd(b, x1, x2) {
      return addNum(neg(mulNum(mul(x1, exp(neg(bx(b[2], x2)))), b[1])), b[0]);
    },
  },
  // y = b1 + b2*cos(2πx/12) + b3*sin(2πx/12) + b5*cos(2πx/b4) + b6*sin(2πx/b4) + b8*cos(2πx/b7) + b9*sin(2πx/b7)
  ENSO: {
    n: 9,
    f(b, x, _x2, g) {
      const a = (TWO_PI * x) / 12;
      let s = b[0] + b[1] * Math.cos(a) + b[2] * Math.sin(a);
      if (g) {
        g[0] = 1;
        g[1] = Math.cos(a);
        g[2] = Math.sin(a);
      }
      for (const o of [3, 6]) {
        const th = (TWO_PI * x) / b[o];
        const c = Math.cos(th);
        const sn = Math.sin(th);
        s += b[o + 1] * c + b[o + 2] * sn;
        if (g) {
          // dθ/db = −θ/b
          g[o] = ((b[o + 1] * sn - b[o + 2] * c) * th) / b[o];
          g[o + 1] = c;
          g[o + 2] = sn;
        }
      }
      return s;
    },
    fDd(b, x) {
      const [s1, c1] = sinCos(div(mul(TWO_PI_DD, x), fromNumber(12)));
      let s = addNum(add(mulNum(c1, b[1]), mulNum(s1, b[2])), b[0]);
      for (const o of [3, 6]) {
        const [sn, c] = sinCos(div(mul(TWO_PI_DD, x), fromNumber(b[o])));
        s = add(s, add(mulNum(c, b[o + 1]), mulNum(sn, b[o + 2])));
      }
      return s;
    },
  },
  // y = b1 - b2*x - arctan[b3/(x-b4)]/pi
  Roszman1: {
    n: 4,
    f(b, x, _x2, g) {
      const d = x - b[3];
      const w = b[2] / d;
      if (g) {
        const k = 1 / (Math.PI * (1 + w * w));
        g[0] = 1;
        g[1] = -x;
        g[2] = -k / d;
        g[3] = (-k * b[2]) / (d * d);
      }
      return b[0] - b[1] * x - Math.atan(w) / Math.PI;
    },
    fDd(b, x) {
      const w = div(fromNumber(b[2]), addNum(x, -b[3]));
      return sub(addNum(neg(bx(b[1], x)), b[0]), div(atan(w), PI));
    },
  },
};
