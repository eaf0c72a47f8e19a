/*
 * The compiled reference of the flattened-drop tracer benchmark (bench/tracer-reference.ts): a plain C translation
 * of lib/rays/shape-tracer.ts's traceDrop, step for step (the wall r(μ) = 1 + Σ c_n cos nθ of Beard & Chuang 1987
 * Eq. 1 with its Chebyshev recurrences, the same first guesses, Newton's method safeguarded by the bracket with the
 * same stopping rules, Fresnel's complex amplitudes of Born & Wolf 1999 §1.5.2 Eq. 21 for both polarisations as
 * complex 3-vectors, Beer–Lambert along each chord, and the ray differential of Igehy 1999 §3 with the normal's change
 * from r″(μ)), on the same rays in the same order. It times itself (compute only: no process start, no output).
 *
 * Usage: tracer-reference n absorptionPerRadius maxOrder ax ay az dx dy dz e1x e1y e1z e2x e2y e2z rays seed reps c0 … c10
 * Prints: milliseconds per pass (median of reps), traces per pass, checksum (see checksum_of, as the TypeScript side).
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#define MAX_ORDER 3
#define TERMS 11
#define BRACKET_STEPS 24
#define START_INSIDE 1e-9
#define ROOT_TOLERANCE 1e-14

static double c[TERMS];
static double axis[3];
static double n_water, absorption, max_radius;
static int max_order;

typedef struct {
  int valid;
  double dir[3], point[3], path, e[12], dirV[3], pointV[3];
} Order;

/* r, r′ and (curvature) r″ of the cosine series at μ: T_{n+1} = 2μT_n − T_{n−1} and its derivatives. */
static void radius_terms(double mu, double *out, int curvature) {
  double tPrev = 1, t = mu, dPrev = 0, d = 1, ddPrev = 0, dd = 0;
  double r = 1 + c[0], r1 = 0, r2 = 0;
  for (int n = 1; n < TERMS; n++) {
    double cn = c[n];
    r += cn * t;
    r1 += cn * d;
    if (curvature) {
      r2 += cn * dd;
      double ddNext = 4 * d + 2 * mu * dd - ddPrev;
      ddPrev = dd;
      dd = ddNext;
    }
    double dNext = 2 * t + 2 * mu * d - dPrev;
    double tNext = 2 * mu * t - tPrev;
    dPrev = d;
    d = dNext;
    tPrev = t;
    t = tNext;
  }
  out[0] = r;
  out[1] = r1;
  out[2] = r2;
}

static double radius_only(double mu) {
  double out[3];
  radius_terms(mu, out, 0);
  return out[0];
}

static double grad[3], terms[3], wall_len, wall_p[3], wall_mu, grad_norm;

static double surface(double x, double y, double z) {
  double len = sqrt(x * x + y * y + z * z);
  double mu = -(x * axis[0] + y * axis[1] + z * axis[2]) / len;
  return len - radius_only(mu);
}

static double wall_at(double x, double y, double z, int curvature) {
  double len = sqrt(x * x + y * y + z * z);
  double px = x / len, py = y / len, pz = z / len;
  double mu = -(px * axis[0] + py * axis[1] + pz * axis[2]);
  radius_terms(mu, terms, curvature);
  double k = terms[1] / len;
  grad[0] = px + k * (axis[0] + mu * px);
  grad[1] = py + k * (axis[1] + mu * py);
  grad[2] = pz + k * (axis[2] + mu * pz);
  wall_len = len;
  wall_p[0] = px;
  wall_p[1] = py;
  wall_p[2] = pz;
  wall_mu = mu;
  return len - terms[0];
}

static void surface_gradient(double x, double y, double z) {
  wall_at(x, y, z, 1);
  double g = sqrt(grad[0] * grad[0] + grad[1] * grad[1] + grad[2] * grad[2]);
  for (int i = 0; i < 3; i++) grad[i] /= g;
  grad_norm = g;
}

static double bounding_exit(const double *o, const double *d, double radius, int entry) {
  double b = o[0] * d[0] + o[1] * d[1] + o[2] * d[2];
  double cc = o[0] * o[0] + o[1] * o[1] + o[2] * o[2] - radius * radius;
  double disc = b * b - cc;
  if (disc < 0) return NAN;
  double root = sqrt(disc);
  return entry ? -b - root : -b + root;
}

static double sphere_guess(const double *o, const double *d, double tBound, int entry) {
  double x = o[0] + tBound * d[0], y = o[1] + tBound * d[1], z = o[2] + tBound * d[2];
  double mu = -(x * axis[0] + y * axis[1] + z * axis[2]) / sqrt(x * x + y * y + z * z);
  return bounding_exit(o, d, radius_only(mu), entry);
}

static double polish(const double *o, const double *d, double lo, double hi, double fLo, double start) {
  double t = (start > lo && start < hi) ? start : (fLo > 0 ? lo : hi);
  for (int it = 0; it < 60; it++) {
    double x = o[0] + t * d[0], y = o[1] + t * d[1], z = o[2] + t * d[2];
    double f = wall_at(x, y, z, 0);
    if (f == 0) return t;
    if ((f > 0) == (fLo > 0)) lo = t;
    else hi = t;
    double slope = grad[0] * d[0] + grad[1] * d[1] + grad[2] * d[2];
    double next = slope != 0 ? t - f / slope : NAN;
    int newton = next > lo && next < hi;
    if (!newton) next = 0.5 * (lo + hi);
    double step = next - t;
    if ((newton && step * step < ROOT_TOLERANCE * fabs(slope)) || hi - lo < ROOT_TOLERANCE) return next;
    t = next;
  }
  return t;
}

static double crossing(const double *o, const double *d, double tStart, double tEnd, double fromSign) {
  double tPrev = tStart, fPrev = fromSign, step = (tEnd - tStart) / BRACKET_STEPS;
  for (int s = 1; s <= BRACKET_STEPS; s++) {
    double t = tStart + s * step;
    double f = surface(o[0] + t * d[0], o[1] + t * d[1], o[2] + t * d[2]);
    if (f * fromSign <= 0) return polish(o, d, tPrev, t, fPrev, NAN);
    tPrev = t;
    fPrev = f;
  }
  return NAN;
}

/* Fresnel amplitudes (Born & Wolf 1999 §1.5.2 Eq. 21, §1.5.4 beyond the critical angle). */
static double rPerpRe, rPerpIm, rParRe, rParIm, tPerp, tPar, cosRefraction;
static void interface_amplitudes(double n1, double n2, double cosI) {
  double ratio = n1 / n2;
  double sin2t = ratio * ratio * (1 - cosI * cosI);
  if (sin2t <= 1) {
    double cosT = sqrt(1 - sin2t);
    double rPerp = (n1 * cosI - n2 * cosT) / (n1 * cosI + n2 * cosT);
    double rPar = (n2 * cosI - n1 * cosT) / (n2 * cosI + n1 * cosT);
    rPerpRe = rPerp;
    rPerpIm = 0;
    rParRe = rPar;
    rParIm = 0;
    tPerp = sqrt(fmax(0, 1 - rPerp * rPerp));
    tPar = sqrt(fmax(0, 1 - rPar * rPar));
    cosRefraction = cosT;
    return;
  }
  double q = sqrt(sin2t - 1);
  double a = n1 * cosI, b = n2 * q, dd = a * a + b * b;
  rPerpRe = (a * a - b * b) / dd;
  rPerpIm = (-2 * a * b) / dd;
  a = n2 * cosI;
  b = n1 * q;
  dd = a * a + b * b;
  rParRe = (a * a - b * b) / dd;
  rParIm = (-2 * a * b) / dd;
  tPerp = 0;
  tPar = 0;
  cosRefraction = 0;
}

static void cross(const double *a, const double *b, double *out) {
  double x = a[1] * b[2] - a[2] * b[1], y = a[2] * b[0] - a[0] * b[2], z = a[0] * b[1] - a[1] * b[0];
  out[0] = x;
  out[1] = y;
  out[2] = z;
}

static double sVec[3], pIn[3], pRef[3], pTr[3], kRef[3], kTr[3], field[12], reflected[12], transmitted[12];

static int split(const double *k, const double *nu, double n1, double n2) {
  double cosI = -(k[0] * nu[0] + k[1] * nu[1] + k[2] * nu[2]);
  interface_amplitudes(n1, n2, cosI);
  cross(k, nu, sVec);
  double sLen = sqrt(sVec[0] * sVec[0] + sVec[1] * sVec[1] + sVec[2] * sVec[2]);
  if (sLen < 1e-12) {
    double helper[3] = {fabs(k[0]) < 0.9 ? 1 : 0, fabs(k[0]) < 0.9 ? 0 : 1, 0};
    cross(k, helper, sVec);
    sLen = sqrt(sVec[0] * sVec[0] + sVec[1] * sVec[1] + sVec[2] * sVec[2]);
  }
  for (int i = 0; i < 3; i++) sVec[i] /= sLen;
  for (int i = 0; i < 3; i++) kRef[i] = k[i] + 2 * cosI * nu[i];
  int total = tPerp == 0 && tPar == 0;
  if (!total) {
    double ratio = n1 / n2, along = ratio * cosI - cosRefraction;
    for (int i = 0; i < 3; i++) kTr[i] = ratio * k[i] + along * nu[i];
    double len = sqrt(kTr[0] * kTr[0] + kTr[1] * kTr[1] + kTr[2] * kTr[2]);
    for (int i = 0; i < 3; i++) kTr[i] /= len;
  }
  cross(sVec, k, pIn);
  cross(sVec, kRef, pRef);
  if (!total) cross(sVec, kTr, pTr);
  for (int q = 0; q < 2; q++) {
    int b = 6 * q;
    double sRe = field[b] * sVec[0] + field[b + 1] * sVec[1] + field[b + 2] * sVec[2];
    double sIm = field[b + 3] * sVec[0] + field[b + 4] * sVec[1] + field[b + 5] * sVec[2];
    double pRe = field[b] * pIn[0] + field[b + 1] * pIn[1] + field[b + 2] * pIn[2];
    double pIm = field[b + 3] * pIn[0] + field[b + 4] * pIn[1] + field[b + 5] * pIn[2];
    double rsRe = rPerpRe * sRe - rPerpIm * sIm, rsIm = rPerpRe * sIm + rPerpIm * sRe;
    double rpRe = rParRe * pRe - rParIm * pIm, rpIm = rParRe * pIm + rParIm * pRe;
    for (int i = 0; i < 3; i++) {
      reflected[b + i] = rsRe * sVec[i] + rpRe * pRef[i];
      reflected[b + 3 + i] = rsIm * sVec[i] + rpIm * pRef[i];
      transmitted[b + i] = total ? 0 : tPerp * sRe * sVec[i] + tPar * pRe * pTr[i];
      transmitted[b + 3 + i] = total ? 0 : tPerp * sIm * sVec[i] + tPar * pIm * pTr[i];
    }
  }
  return !total;
}

static double power(const double *f, int q) {
  double sum = 0;
  for (int i = 0; i < 6; i++) sum += f[6 * q + i] * f[6 * q + i];
  return sum;
}

static double origin[3], dir[3], point[3], normal[3], pointV[3], dirV[3], normalV[3], kRefV[3], kTrV[3];
static Order orders[MAX_ORDER + 1];
static double absorbed[2], remaining[2];

static void transfer_differential(double t) {
  for (int i = 0; i < 3; i++) pointV[i] += t * dirV[i];
  double tV = -(grad[0] * pointV[0] + grad[1] * pointV[1] + grad[2] * pointV[2]) / (grad[0] * dir[0] + grad[1] * dir[1] + grad[2] * dir[2]);
  for (int i = 0; i < 3; i++) pointV[i] += tV * dir[i];
}

static void normal_differential(double sign) {
  double len = wall_len, mu = wall_mu;
  double pw = wall_p[0] * pointV[0] + wall_p[1] * pointV[1] + wall_p[2] * pointV[2];
  double dp[3], g[3];
  for (int i = 0; i < 3; i++) dp[i] = (pointV[i] - wall_p[i] * pw) / len;
  double dmu = -(axis[0] * dp[0] + axis[1] * dp[1] + axis[2] * dp[2]);
  double k = terms[1] / len;
  double dk = terms[2] * dmu / len - terms[1] * pw / (len * len);
  for (int i = 0; i < 3; i++) g[i] = dp[i] + dk * (axis[i] + mu * wall_p[i]) + k * (dmu * wall_p[i] + mu * dp[i]);
  double along = grad[0] * g[0] + grad[1] * g[1] + grad[2] * g[2];
  double scale = sign / grad_norm;
  for (int i = 0; i < 3; i++) normalV[i] = scale * (g[i] - grad[i] * along);
}

static void split_differential(const double *k, const double *kV, const double *nu, double n1, double n2, int transmits) {
  double cosI = -(k[0] * nu[0] + k[1] * nu[1] + k[2] * nu[2]);
  double cosIV = -(kV[0] * nu[0] + kV[1] * nu[1] + kV[2] * nu[2] + k[0] * normalV[0] + k[1] * normalV[1] + k[2] * normalV[2]);
  for (int i = 0; i < 3; i++) kRefV[i] = kV[i] + 2 * (cosIV * nu[i] + cosI * normalV[i]);
  if (!transmits) return;
  double ratio = n1 / n2, cosT = cosRefraction;
  double cosTV = ratio * ratio * cosI * cosIV / cosT;
  double along = ratio * cosI - cosT, alongV = ratio * cosIV - cosTV;
  for (int i = 0; i < 3; i++) kTrV[i] = ratio * kV[i] + alongV * nu[i] + along * normalV[i];
}

static void store_order(int p, const double *k, const double *at, double path, const double *f, const double *kV) {
  Order *o = &orders[p];
  o->valid = 1;
  for (int i = 0; i < 3; i++) {
    o->dirV[i] = kV[i];
    o->pointV[i] = pointV[i];
    o->dir[i] = k[i];
    o->point[i] = at[i];
  }
  memcpy(o->e, f, sizeof(double) * 12);
  o->path = path - (k[0] * at[0] + k[1] * at[1] + k[2] * at[2]);
}

/* traceDrop with a ray differential along originV; returns whether the ray met the drop. */
static int trace_drop(const double *o, const double *d, const double *e1, const double *e2, const double *originV) {
  memset(orders, 0, sizeof(orders));
  absorbed[0] = absorbed[1] = remaining[0] = remaining[1] = 0;
  double bound = max_radius * (1 + 1e-9);
  for (int i = 0; i < 3; i++) {
    origin[i] = o[i];
    dir[i] = d[i];
  }
  double tIn = bounding_exit(origin, dir, bound, 1);
  if (isnan(tIn)) return 0;
  double tFar = bounding_exit(origin, dir, bound, 0);
  double tMid = fmin(tFar, fmax(tIn, -(origin[0] * dir[0] + origin[1] * dir[1] + origin[2] * dir[2])));
  double fMid = surface(origin[0] + tMid * dir[0], origin[1] + tMid * dir[1], origin[2] + tMid * dir[2]);
  double t = fMid < 0 ? polish(origin, dir, tIn, tMid, 1, sphere_guess(origin, dir, tIn, 1)) : crossing(origin, dir, tIn, tFar, 1);
  if (isnan(t)) return 0;
  for (int i = 0; i < 3; i++) point[i] = origin[i] + t * dir[i];
  surface_gradient(point[0], point[1], point[2]);
  for (int i = 0; i < 3; i++) {
    pointV[i] = originV[i];
    dirV[i] = 0;
  }
  transfer_differential(t);
  for (int i = 0; i < 3; i++) {
    normal[i] = grad[i];
    field[i] = e1[i];
    field[3 + i] = 0;
    field[6 + i] = e2[i];
    field[9 + i] = 0;
  }
  double path = dir[0] * point[0] + dir[1] * point[1] + dir[2] * point[2];
  int entered = split(dir, normal, 1, n_water);
  normal_differential(1);
  split_differential(dir, dirV, normal, 1, n_water, entered);
  memcpy(dirV, kTrV, sizeof(dirV));
  store_order(0, kRef, point, path, reflected, kRefV);
  memcpy(field, transmitted, sizeof(field));
  for (int i = 0; i < 3; i++) dir[i] = kTr[i];
  for (int p = 1; p <= max_order; p++) {
    double tExit = bounding_exit(point, dir, bound, 0);
    double tHit = polish(point, dir, START_INSIDE, tExit, -1, sphere_guess(point, dir, tExit, 0));
    if (!(tHit > START_INSIDE)) break;
    for (int i = 0; i < 3; i++) point[i] += tHit * dir[i];
    path += n_water * tHit;
    double keep = exp(-0.5 * absorption * tHit);
    for (int q = 0; q < 2; q++) {
      double before = power(field, q);
      for (int i = 0; i < 6; i++) field[6 * q + i] *= keep;
      absorbed[q] += before - power(field, q);
    }
    surface_gradient(point[0], point[1], point[2]);
    transfer_differential(tHit);
    for (int i = 0; i < 3; i++) normal[i] = -grad[i];
    int leaves = split(dir, normal, n_water, 1);
    normal_differential(-1);
    split_differential(dir, dirV, normal, n_water, 1, leaves);
    memcpy(dirV, kRefV, sizeof(dirV));
    if (leaves) store_order(p, kTr, point, path, transmitted, kTrV);
    memcpy(field, reflected, sizeof(field));
    for (int i = 0; i < 3; i++) dir[i] = kRef[i];
  }
  remaining[0] = power(field, 0);
  remaining[1] = power(field, 1);
  return 1;
}

/* Σ over valid orders of dir·(1, 2, 3) + dirV·(1, 1, 1) + path + the first polarisation's power: as the TypeScript side. */
static double checksum_of(void) {
  double sum = 0;
  for (int p = 0; p <= max_order; p++) {
    Order *o = &orders[p];
    if (!o->valid) continue;
    sum += o->dir[0] + 2 * o->dir[1] + 3 * o->dir[2] + o->dirV[0] + o->dirV[1] + o->dirV[2] + o->path + power(o->e, 0);
  }
  return sum;
}

static int compare(const void *a, const void *b) {
  double x = *(const double *)a, y = *(const double *)b;
  return (x > y) - (x < y);
}

int main(int argc, char **argv) {
  if (argc != 19 + TERMS) {
    fprintf(stderr, "usage: see the header comment\n");
    return 2;
  }
  int a = 1;
  n_water = atof(argv[a++]);
  absorption = atof(argv[a++]);
  max_order = atoi(argv[a++]);
  for (int i = 0; i < 3; i++) axis[i] = atof(argv[a++]);
  double d[3], e1[3], e2[3];
  for (int i = 0; i < 3; i++) d[i] = atof(argv[a++]);
  for (int i = 0; i < 3; i++) e1[i] = atof(argv[a++]);
  for (int i = 0; i < 3; i++) e2[i] = atof(argv[a++]);
  int rays = atoi(argv[a++]);
  double seed0 = atof(argv[a++]);
  int reps = atoi(argv[a++]);
  for (int i = 0; i < TERMS; i++) c[i] = atof(argv[a++]);
  /* The outline's bound as cosineSeriesOutline finds it: the largest r on 3601 polar angles, plus 0.1 %. */
  double found = 0, sumAbs = 1;
  for (int i = 0; i < TERMS; i++) sumAbs += fabs(c[i]);
  for (int s = 0; s <= 3600; s++) found = fmax(found, radius_only(cos(M_PI * s / 3600)));
  max_radius = fmin(sumAbs, found * (1 + 1e-3));
  /* The rays: pupil points (u, v) in the launch plane, as the TypeScript side draws them (the minimal standard generator x <- 48271 x mod (2^31 - 1), whose products stay exact in doubles). */
  double *us = malloc(sizeof(double) * rays), *vs = malloc(sizeof(double) * rays);
  double seed = seed0;
  for (int i = 0; i < rays; i++) {
    seed = fmod(seed * 48271.0, 2147483647.0);
    double u = (seed / 2147483647.0 * 2 - 1) * max_radius;
    seed = fmod(seed * 48271.0, 2147483647.0);
    double v = (seed / 2147483647.0 * 2 - 1) * max_radius;
    us[i] = u;
    vs[i] = v;
  }
  double launch = 2 * max_radius + 1;
  double *times = malloc(sizeof(double) * reps);
  double checksum = 0;
  for (int r = 0; r < reps; r++) {
    struct timespec t0, t1;
    clock_gettime(CLOCK_MONOTONIC, &t0);
    double sum = 0;
    for (int i = 0; i < rays; i++) {
      double o[3];
      for (int k = 0; k < 3; k++) o[k] = us[i] * e1[k] + vs[i] * e2[k] - launch * d[k];
      if (trace_drop(o, d, e1, e2, e2)) sum += checksum_of();
    }
    clock_gettime(CLOCK_MONOTONIC, &t1);
    times[r] = (t1.tv_sec - t0.tv_sec) * 1e3 + (t1.tv_nsec - t0.tv_nsec) / 1e6;
    checksum = sum;
  }
  qsort(times, reps, sizeof(double), compare);
  printf("%.6f %d %.17g\n", times[reps / 2], rays, checksum);
  free(us);
  free(vs);
  free(times);
  return 0;
}
