/* Reference timing for npm run bench -- --matrix FILE --cholmod: reads a symmetric Matrix Market
   file and times the supernodal Cholesky of SuiteSparse (CHOLMOD, its default ordering) through
   its public API: analyse and factorize, one JSON line per repetition, in CPU seconds of the process
   (the machine is shared; wall time would count other loads).
   Built on demand by cli/bench-matrix.ts: cc -O2 bench-cholmod.c -lcholmod -lsuitesparseconfig */
#include <stdio.h>
#include <stdlib.h>
#include <time.h>
#include <suitesparse/cholmod.h>

static double seconds(void) {
  struct timespec t;
  clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &t);
  return t.tv_sec + 1e-9 * t.tv_nsec;
}

int main(int argc, char **argv) {
  if (argc < 2) {
    fprintf(stderr, "usage: bench-cholmod FILE.mtx [REPEAT]\n");
    return 2;
  }
  cholmod_common c;
  cholmod_start(&c);
  c.supernodal = CHOLMOD_SUPERNODAL;
  FILE *f = fopen(argv[1], "r");
  if (!f) {
    fprintf(stderr, "bench-cholmod: cannot open %s\n", argv[1]);
    return 2;
  }
  cholmod_sparse *A = cholmod_read_sparse(f, &c);
  fclose(f);
  if (!A) return 1;
  int repeat = argc > 2 ? atoi(argv[2]) : 3;
  for (int r = 0; r < repeat; r++) {
    double t0 = seconds();
    cholmod_factor *L = cholmod_analyze(A, &c);
    double t1 = seconds();
    cholmod_factorize(A, L, &c);
    double t2 = seconds();
    printf("{\"n\":%d,\"nnzL\":%.0f,\"analyse_s\":%.4f,\"factorize_s\":%.4f,\"status\":%d}\n",
           (int)A->nrow, c.lnz, t1 - t0, t2 - t1, c.status);
    cholmod_free_factor(&L, &c);
  }
  cholmod_free_sparse(&A, &c);
  cholmod_finish(&c);
  return 0;
}
