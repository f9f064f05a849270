/* A plain depth-first sieve of 3x+1 mod 2^K, one core, as a reference for the kernel's speed (not
 * part of glidepath): the class (m, b) with T^j(a + 2^j x) = 3^m x + b gets two children, the even
 * one (b + e 3^m) / 2 and the odd one (3 (b + e' 3^m) + 1) / 2, and a child whose coefficient
 * 3^m / 2^j has dropped below 1 is cut. Prints the survivors at depth K, the live nodes (the root
 * and every class not cut) and the seconds, the median of five runs.
 * Build and run: gcc -O2 -o plain-sieve bench/plain-sieve.c && ./plain-sieve 36 (K <= 40: 64 bits). */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static int K;
static uint64_t p3[64];
static int drop[64]; /* bitlen(3^m): the least j with 3^m < 2^j */
static uint64_t survivors, nodes;

static void walk(uint64_t b, int m, int j) {
  nodes++;
  if (j == K) {
    survivors++;
    return;
  }
  uint64_t qm = p3[m], e0 = b & 1;
  if (j + 1 < drop[m]) walk((b + (e0 ? qm : 0)) >> 1, m, j + 1);
  if (j + 1 < drop[m + 1]) walk((3 * (b + (e0 ? 0 : qm)) + 1) >> 1, m + 1, j + 1);
}

static int cmp(const void *x, const void *y) {
  double a = *(const double *)x, b = *(const double *)y;
  return a < b ? -1 : a > b;
}

int main(int argc, char **argv) {
  K = argc > 1 ? atoi(argv[1]) : 32;
  if (K < 1 || K > 40) {
    fprintf(stderr, "depth must be from 1 to 40\n");
    return 2;
  }
  p3[0] = 1;
  for (int i = 1; i < 41; i++) p3[i] = p3[i - 1] * 3;
  for (int m = 0; m < 41; m++) {
    int j = 0;
    while (j < 64 && (p3[m] >> j) != 0) j++;
    drop[m] = j;
  }
  double t[5];
  for (int r = 0; r < 5; r++) {
    struct timespec s, e;
    survivors = nodes = 0;
    clock_gettime(CLOCK_MONOTONIC, &s);
    walk(0, 0, 0);
    clock_gettime(CLOCK_MONOTONIC, &e);
    t[r] = (e.tv_sec - s.tv_sec) + (e.tv_nsec - s.tv_nsec) / 1e9;
  }
  qsort(t, 5, sizeof t[0], cmp);
  printf("depth %d: %llu survivors, %llu nodes, %.3f s (median of 5)\n", K, (unsigned long long)survivors,
         (unsigned long long)nodes, t[2]);
  return 0;
}
