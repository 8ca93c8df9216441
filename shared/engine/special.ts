// Exponentially scaled modified Bessel functions for the exponential disk's
// circular speed: e^-x I_n(x) and e^x K_n(x), n = 0, 1, from the polynomial
// approximations of Abramowitz & Stegun (1964) 9.8.1-9.8.8 (|error| below
// about 2e-7 relative; coefficients from memory, checked in the tests against
// an independent Bessel package). Scaling keeps I_n K_n finite at large x.

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { exp, log, sqrt } = Math;

const poly = (t: number, c: readonly number[]): number => {
  let s = 0;
  for (let k = c.length - 1; k >= 0; k--) s = s * t + c[k];
  return s;
};

const I0_SMALL = [1, 3.5156229, 3.0899424, 1.2067492, 0.2659732, 0.0360768, 0.0045813];
const I0_LARGE = [0.39894228, 0.01328592, 0.00225319, -0.00157565, 0.00916281, -0.02057706, 0.02635537, -0.01647633, 0.00392377];
const I1_SMALL = [0.5, 0.87890594, 0.51498869, 0.15084934, 0.02658733, 0.00301532, 0.00032411];
const I1_LARGE = [0.39894228, -0.03988024, -0.00362018, 0.00163801, -0.01031555, 0.02282967, -0.02895312, 0.01787654, -0.00420059];
const K0_SMALL = [-0.57721566, 0.4227842, 0.23069756, 0.0348859, 0.00262698, 0.0001075, 0.0000074];
const K0_LARGE = [1.25331414, -0.07832358, 0.02189568, -0.01062446, 0.00587872, -0.0025154, 0.00053208];
const K1_SMALL = [1, 0.15443144, -0.67278579, -0.18156897, -0.01919402, -0.00110404, -0.00004686];
const K1_LARGE = [1.25331414, 0.23498619, -0.0365562, 0.01504268, -0.00780353, 0.00325614, -0.00068245];

/** e^-x I0(x), x >= 0. */
export function i0e(x: number): number {
  if (x <= 3.75) return poly((x / 3.75) ** 2, I0_SMALL) * exp(-x);
  return poly(3.75 / x, I0_LARGE) / sqrt(x);
}

/** e^-x I1(x), x >= 0. */
export function i1e(x: number): number {
  if (x <= 3.75) return x * poly((x / 3.75) ** 2, I1_SMALL) * exp(-x);
  return poly(3.75 / x, I1_LARGE) / sqrt(x);
}

/** e^x K0(x), x > 0. */
export function k0e(x: number): number {
  if (x <= 2) {
    const h = x / 2;
    return (-log(h) * i0e(x) * exp(x) + poly(h * h, K0_SMALL)) * exp(x);
  }
  return poly(2 / x, K0_LARGE) / sqrt(x);
}

/** e^x K1(x), x > 0. */
export function k1e(x: number): number {
  if (x <= 2) {
    const h = x / 2;
    return ((x * log(h) * i1e(x) * exp(x) + poly(h * h, K1_SMALL)) / x) * exp(x);
  }
  return poly(2 / x, K1_LARGE) / sqrt(x);
}
