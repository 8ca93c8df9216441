/* The bench's native reference: the softened direct sum as a C compiler vectorises it
 * (cc -O3 -march=native -ffast-math), one thread, float64, nothing hoisted but the target.
 * stdin: int32 n, int32 repeats (the bench passes 1 and alternates it with its other loops), float64 eps2, then x, y, z, m (n float64 each).
 * stdout: float64 best seconds of the repeats, then ax, ay, az (n each, before the factor G). */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static double now(void) {
  struct timespec t;
  clock_gettime(CLOCK_MONOTONIC, &t);
  return t.tv_sec + t.tv_nsec * 1e-9;
}

static void field(int n, const double *restrict x, const double *restrict y, const double *restrict z,
                  const double *restrict m, double eps2, double *restrict ax, double *restrict ay, double *restrict az) {
  for (int i = 0; i < n; i++) {
    const double xi = x[i], yi = y[i], zi = z[i];
    double sx = 0, sy = 0, sz = 0;
    for (int j = 0; j < n; j++) {
      const double dx = x[j] - xi, dy = y[j] - yi, dz = z[j] - zi;
      const double inv = 1.0 / sqrt(dx * dx + dy * dy + dz * dz + eps2);
      const double f = m[j] * inv * inv * inv;
      sx += f * dx; sy += f * dy; sz += f * dz;
    }
    ax[i] = sx; ay[i] = sy; az[i] = sz;
  }
}

int main(void) {
  int32_t n, repeats;
  double eps2;
  if (fread(&n, 4, 1, stdin) != 1 || fread(&repeats, 4, 1, stdin) != 1 || fread(&eps2, 8, 1, stdin) != 1 || n < 1 || repeats < 1) return 2;
  double *a = malloc(sizeof(double) * 7 * (size_t)n);
  if (!a || fread(a, 8, 4 * (size_t)n, stdin) != 4 * (size_t)n) return 2;
  double best = INFINITY;
  for (int r = 0; r < repeats; r++) {
    const double t = now();
    field(n, a, a + n, a + 2 * n, a + 3 * n, eps2, a + 4 * n, a + 5 * n, a + 6 * n);
    const double dt = now() - t;
    if (dt < best) best = dt;
  }
  fwrite(&best, 8, 1, stdout);
  fwrite(a + 4 * n, 8, 3 * (size_t)n, stdout);
  return 0;
}
