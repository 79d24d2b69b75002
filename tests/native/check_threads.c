/*
 * check_threads DECK PARAMETER V1 V2
 *
 * Different runs used from different threads at the same time: two threads each own a run of DECK with the model
 * parameter PARAMETER set to V1 and V2 and run pivot and spectrum several times; every result must be
 * bit-identical to the same run done alone on the main thread first. Exit 0 when all agree.
 */
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "modesolver.h"

#define REPEATS 3

typedef struct {
    const char *deck;
    char key[160];
    double value;
    double ns, as, p0; /* n_s, A_s and P_s of the first spectrum sample */
    int failed;
} job;

static int run_once(job *j, double *ns, double *as, double *p0) {
    ms_run *run = ms_run_new();
    int ok = ms_run_load_deck_file(run, j->deck) == MS_OK && ms_run_set_number(run, j->key, j->value) == MS_OK &&
             ms_run_set_threads(run, 1) == MS_OK && ms_run_pivot(run) == MS_OK && ms_run_spectrum(run) == MS_OK &&
             ms_run_value(run, "n_s", ns) == MS_OK && ms_run_value(run, "A_s", as) == MS_OK;
    double k[100000];
    size_t n = 0;
    ok = ok && ms_run_spectrum_size(run, &n) == MS_OK && n <= 100000 && ms_run_spectrum_copy(run, k, p0, NULL, NULL, n) == MS_OK;
    if (!ok) fprintf(stderr, "FAIL %s = %g: %s\n", j->key, j->value, ms_run_error(run));
    ms_run_free(run);
    return ok;
}

static void *worker(void *arg) {
    job *j = arg;
    for (int i = 0; i < REPEATS; i++) {
        double ns, as, p0[100000];
        if (!run_once(j, &ns, &as, p0)) { j->failed = 1; return NULL; }
        if (ns != j->ns || as != j->as || p0[0] != j->p0) {
            fprintf(stderr, "FAIL %s = %g, repeat %d: n_s %.17g vs %.17g alone\n", j->key, j->value, i, ns, j->ns);
            j->failed = 1;
        }
    }
    return NULL;
}

int main(int argc, char **argv) {
    if (argc != 5) { fprintf(stderr, "usage: check_threads DECK PARAMETER V1 V2\n"); return 2; }
    static job jobs[2];
    static double p0[100000];
    for (int i = 0; i < 2; i++) {
        jobs[i].deck = argv[1];
        snprintf(jobs[i].key, sizeof jobs[i].key, "model.parameters.%s", argv[2]);
        jobs[i].value = atof(argv[3 + i]);
        if (!run_once(&jobs[i], &jobs[i].ns, &jobs[i].as, p0)) return 1;
        jobs[i].p0 = p0[0];
        printf("alone: %s = %g gives n_s %.17g\n", jobs[i].key, jobs[i].value, jobs[i].ns);
    }
    if (jobs[0].ns == jobs[1].ns) { fprintf(stderr, "FAIL: the two parameter values give the same n_s\n"); return 1; }
    pthread_t t[2];
    for (int i = 0; i < 2; i++) pthread_create(&t[i], NULL, worker, &jobs[i]);
    for (int i = 0; i < 2; i++) pthread_join(t[i], NULL);
    int failed = jobs[0].failed || jobs[1].failed;
    printf("check_threads: %s\n", failed ? "FAILED" : "2 threads x 3 repeats bit-identical to the runs alone");
    return failed ? 1 : 0;
}
