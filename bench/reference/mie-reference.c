/*
 * Compiled reference for the benchmark (bench/compiled-reference.ts builds it with `cc -O3 -march=native`):
 * a plain C translation of the recurrences lib/mie uses, so that our kernels are timed against what a compiler
 * makes of the same arithmetic on the same machine, in the same run.
 *   coefficients: Bohren & Huffman 1983 eq. 4.88 with D_n(mx) by downward recurrence (eq. 4.89) and ψ_n, χ_n by
 *                 upward recurrence (§4.8); N = x + 6·x^(1/3) + 2 terms (Wiscombe 1980 form, lib/mie/termCount.ts)
 *   amplitudes:   S1 ± S2 = Σ w_n (a_n ± b_n)(π_n ± τ_n), w_n = (2n+1)/(n(n+1)) (B&H eq. 4.74), π_n, τ_n in
 *                 Wiscombe's 1980 arrangement (Appl. Opt. 19, 1505): n outer, angles inner, so the compiler
 *                 vectorises the angle loop.
 * Usage: mie-reference mRe mIm fromDeg toDeg stepDeg reps x1 [x2 ...]
 * Per rep it computes every drop x_i (coefficients, then amplitudes over the angle grid) and times itself with
 * CLOCK_PROCESS_CPUTIME_ID (time on the CPU, as ours is timed on a shared machine): compute only, no process
 * start, no output inside the timed region. Prints one line:
 *   <median total ms> <median coefficient ms> <median amplitude ms> <checksum: Σ over drops and angles |S1|²+|S2|²>
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

static double now_ms(void) {
  struct timespec t;
  clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &t);
  return 1e3 * (double)t.tv_sec + 1e-6 * (double)t.tv_nsec;
}

static int cmp(const void *a, const void *b) {
  double d = *(const double *)a - *(const double *)b;
  return (d > 0) - (d < 0);
}

static int term_count(double x) { return (int)ceil(x + 6.0 * cbrt(x) + 2.0); }

/* packed per n (0-based i = n−1): w(a+b) re, im, w(a−b) re, im */
static void coefficients(double mRe, double mIm, double x, int N, double *psi, double *chi, double *dRe, double *dIm,
                         double *sRe, double *sIm, double *mdRe, double *mdIm) {
  double s = sin(x), c = cos(x);
  psi[0] = s;
  chi[0] = c;
  psi[1] = s / x - c;
  chi[1] = c / x + s;
  for (int n = 2; n <= N; n++) {
    double f = (2.0 * n - 1.0) / x;
    psi[n] = f * psi[n - 1] - psi[n - 2];
    chi[n] = f * chi[n - 1] - chi[n - 2];
  }
  double zRe = mRe * x, zIm = mIm * x;
  double absz = hypot(zRe, zIm);
  int start = (int)ceil(1.1 * (N > absz ? N : absz) + 200);
  double z2 = zRe * zRe + zIm * zIm, izRe = zRe / z2, izIm = -zIm / z2;
  double re = 0, im = 0;
  for (int n = start; n >= 1; n--) {
    double nzRe = n * izRe, nzIm = n * izIm;
    double tRe = re + nzRe, tIm = im + nzIm;
    double t2 = tRe * tRe + tIm * tIm;
    re = nzRe - tRe / t2;
    im = nzIm + tIm / t2;
    if (n - 1 <= N) {
      dRe[n - 1] = re;
      dIm[n - 1] = im;
    }
  }
  double m2 = mRe * mRe + mIm * mIm, imRe = mRe / m2, imIm = -mIm / m2;
  for (int n = 1; n <= N; n++) {
    double nx = n / x, ps = psi[n], ps1 = psi[n - 1];
    double xiRe = ps, xiIm = -chi[n], xi1Re = ps1, xi1Im = -chi[n - 1];
    double ab[2][2];
    for (int k = 0; k < 2; k++) {
      double fRe, fIm;
      if (k == 0) {
        fRe = dRe[n] * imRe - dIm[n] * imIm + nx;
        fIm = dRe[n] * imIm + dIm[n] * imRe;
      } else {
        fRe = dRe[n] * mRe - dIm[n] * mIm + nx;
        fIm = dRe[n] * mIm + dIm[n] * mRe;
      }
      double numRe = fRe * ps - ps1, numIm = fIm * ps;
      double denRe = fRe * xiRe - fIm * xiIm - xi1Re, denIm = fRe * xiIm + fIm * xiRe - xi1Im;
      double d2 = denRe * denRe + denIm * denIm;
      ab[k][0] = (numRe * denRe + numIm * denIm) / d2;
      ab[k][1] = (numIm * denRe - numRe * denIm) / d2;
    }
    double w = (2.0 * n + 1.0) / ((double)n * (n + 1.0));
    sRe[n - 1] = w * (ab[0][0] + ab[1][0]);
    sIm[n - 1] = w * (ab[0][1] + ab[1][1]);
    mdRe[n - 1] = w * (ab[0][0] - ab[1][0]);
    mdIm[n - 1] = w * (ab[0][1] - ab[1][1]);
  }
}

static void amplitudes(int N, const double *sRe, const double *sIm, const double *mdRe, const double *mdIm, int J,
                       const double *mu, double *prev, double *cur, double *pr, double *pi, double *mr, double *mi) {
  for (int j = 0; j < J; j++) {
    prev[j] = 0;
    cur[j] = 1;
    pr[j] = pi[j] = mr[j] = mi[j] = 0;
  }
  for (int i = 0; i < N; i++) {
    const double n = i + 1.0, f = (n + 1.0) / n;
    const double a = sRe[i], b = sIm[i], c = mdRe[i], d = mdIm[i];
    for (int j = 0; j < J; j++) {
      double s = mu[j] * cur[j];
      double t = s - prev[j];
      double tau = n * t - prev[j];
      double pp = cur[j] + tau, pm = cur[j] - tau;
      pr[j] += a * pp;
      pi[j] += b * pp;
      mr[j] += c * pm;
      mi[j] += d * pm;
      prev[j] = cur[j];
      cur[j] = s + f * t;
    }
  }
}

int main(int argc, char **argv) {
  if (argc < 8) {
    fprintf(stderr, "usage: %s mRe mIm fromDeg toDeg stepDeg reps x1 [x2 ...]\n", argv[0]);
    return 2;
  }
  double mRe = atof(argv[1]), mIm = atof(argv[2]), from = atof(argv[3]), to = atof(argv[4]), step = atof(argv[5]);
  int reps = atoi(argv[6]), drops = argc - 7;
  double *xs = malloc(sizeof(double) * drops);
  int maxN = 0;
  double maxX = 0;
  for (int k = 0; k < drops; k++) {
    xs[k] = atof(argv[7 + k]);
    int N = term_count(xs[k]);
    if (N > maxN) maxN = N;
    if (xs[k] > maxX) maxX = xs[k];
  }
  int J = (int)lround((to - from) / step) + 1;
  double *mu = malloc(sizeof(double) * J);
  for (int j = 0; j < J; j++) mu[j] = cos((from + step * j) * M_PI / 180.0);
  double absMx = hypot(mRe, mIm) * maxX;
  size_t big = (size_t)ceil(1.1 * (maxN > absMx ? maxN : absMx) + 202);
  double *psi = malloc(sizeof(double) * (maxN + 2)), *chi = malloc(sizeof(double) * (maxN + 2));
  double *dRe = malloc(sizeof(double) * big), *dIm = malloc(sizeof(double) * big);
  double *sRe = malloc(sizeof(double) * maxN), *sIm = malloc(sizeof(double) * maxN);
  double *mdRe = malloc(sizeof(double) * maxN), *mdIm = malloc(sizeof(double) * maxN);
  double *prev = malloc(sizeof(double) * J), *cur = malloc(sizeof(double) * J);
  double *pr = malloc(sizeof(double) * J), *pi = malloc(sizeof(double) * J);
  double *mr = malloc(sizeof(double) * J), *mi = malloc(sizeof(double) * J);
  double *total = malloc(sizeof(double) * reps), *coef = malloc(sizeof(double) * reps), *amp = malloc(sizeof(double) * reps);
  double checksum = 0;
  for (int r = 0; r < reps; r++) {
    double tc = 0, ta = 0, sum = 0;
    for (int k = 0; k < drops; k++) {
      int N = term_count(xs[k]);
      double t0 = now_ms();
      coefficients(mRe, mIm, xs[k], N, psi, chi, dRe, dIm, sRe, sIm, mdRe, mdIm);
      double t1 = now_ms();
      amplitudes(N, sRe, sIm, mdRe, mdIm, J, mu, prev, cur, pr, pi, mr, mi);
      double t2 = now_ms();
      tc += t1 - t0;
      ta += t2 - t1;
      /* |S1|² + |S2|² = ½(|S+|² + |S−|²): consumed so that nothing is optimised away (outside the timed region) */
      for (int j = 0; j < J; j++) sum += 0.5 * (pr[j] * pr[j] + pi[j] * pi[j] + mr[j] * mr[j] + mi[j] * mi[j]);
    }
    coef[r] = tc;
    amp[r] = ta;
    total[r] = tc + ta;
    checksum = sum;
  }
  qsort(total, reps, sizeof(double), cmp);
  qsort(coef, reps, sizeof(double), cmp);
  qsort(amp, reps, sizeof(double), cmp);
  printf("%.6f %.6f %.6f %.17g\n", total[reps / 2], coef[reps / 2], amp[reps / 2], checksum);
  return 0;
}
