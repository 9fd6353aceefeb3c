/**
 * Student-t quantiles for confidence intervals. The CDF uses the regularized
 * incomplete beta function, A(t|ν) relation of Abramowitz & Stegun 26.7.1 and
 * 26.5.27 (recalled from memory), evaluated by the Lentz continued fraction
 * (Numerical Recipes, 3rd ed., §6.4); the quantile is found by bisection.
 */
import { ValidationError } from '../errors';

function logGamma(x: number): number {
  // Lanczos approximation, g = 7, n = 9 (coefficients as published with the method; recalled from memory).
  const coefficients = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
    12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
  ];
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x);
  const z = x - 1;
  let sum = coefficients[0];
  for (let i = 1; i < 9; i++) sum += coefficients[i] / (z + i);
  const t = z + 7.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(sum);
}

function betaContinuedFraction(a: number, b: number, x: number): number {
  const tiny = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 300; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((a - 1 + m2) * (a + m2));
    d = 1 + aa * d; if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c; if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d; h *= d * c;
    aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + 1 + m2));
    d = 1 + aa * d; if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c; if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < 1e-15) break;
  }
  return h;
}

/** Regularized incomplete beta I_x(a, b). */
export function regularizedIncompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const front = Math.exp(logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x));
  return x < (a + 1) / (a + b + 2) ? (front * betaContinuedFraction(a, b, x)) / a : 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b;
}

/** P(T ≤ t) for Student's t with ν degrees of freedom. */
export function studentTCdf(t: number, degreesOfFreedom: number): number {
  const tail = 0.5 * regularizedIncompleteBeta(degreesOfFreedom / (degreesOfFreedom + t * t), degreesOfFreedom / 2, 0.5);
  return t >= 0 ? 1 - tail : tail;
}

/** The t with P(T ≤ t) = probability; e.g. studentTQuantile(0.975, 10) ≈ 2.228. */
export function studentTQuantile(probability: number, degreesOfFreedom: number): number {
  if (!(probability > 0 && probability < 1)) throw new ValidationError('probability', `${probability} is not between 0 and 1`);
  if (!(degreesOfFreedom > 0)) throw new ValidationError('degreesOfFreedom', `${degreesOfFreedom} must be positive`);
  if (probability === 0.5) return 0;
  if (probability < 0.5) return -studentTQuantile(1 - probability, degreesOfFreedom);
  let low = 0;
  let high = 1;
  while (studentTCdf(high, degreesOfFreedom) < probability) high *= 2;
  for (let i = 0; i < 200 && high - low > 1e-12 * high; i++) {
    const mid = 0.5 * (low + high);
    if (studentTCdf(mid, degreesOfFreedom) < probability) low = mid;
    else high = mid;
  }
  return 0.5 * (low + high);
}

/** Two-sided 95 % coverage factor. */
export function studentT95(degreesOfFreedom: number): number {
  return studentTQuantile(0.975, degreesOfFreedom);
}
