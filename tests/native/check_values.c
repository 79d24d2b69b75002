/*
 * check_values DECK NAME=VALUE... [error.NAME=VALUE...] [tolerance_met=0|1] [samples=N] [flags=N]
 *              [model.parameters.P=DECK_VALUE]
 *
 * Runs the whole pipeline on DECK through libmodesolver.so and checks each named result against the expected value
 * (the test passes those read from the command line's summary.json for the same deck) to a relative 1e-9, so too
 * the error estimate of each pivot value (error.n_s: summary.json's errors.n_s), whether the tolerance was met, the
 * number of spectrum samples and of flags. With model.parameters.P=DECK_VALUE it then checks that a sampler's
 * change-and-rerun is clean: P set to 1.1 times its deck value changes n_s, and set back gives bit-identical
 * results, without reloading the deck. Exit 0 when all agree.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "modesolver.h"

static int failures = 0;

static void fail(const char *what, const char *detail) {
    fprintf(stderr, "FAIL %s: %s\n", what, detail);
    failures++;
}

static int call(ms_run *run, int code, const char *what) {
    if (code != MS_OK) {
        char buf[2048];
        snprintf(buf, sizeof buf, "code %d: %s", code, ms_run_error(run));
        fail(what, buf);
    }
    return code;
}

int main(int argc, char **argv) {
    if (argc < 2) { fprintf(stderr, "usage: check_values DECK NAME=VALUE...\n"); return 2; }
    const char *deck = argv[1];
    char rerun_key[160] = "";
    double rerun_value = NAN;
    ms_run *run = ms_run_new();
    if (call(run, ms_run_load_deck_file(run, deck), "load") || call(run, ms_run_spectrum(run), "spectrum")) {
        ms_run_free(run);
        return 1;
    }
    for (int i = 2; i < argc; i++) {
        char name[128];
        const char *eq = strchr(argv[i], '=');
        if (!eq || (size_t)(eq - argv[i]) >= sizeof name) { fail("argument", argv[i]); continue; }
        memcpy(name, argv[i], (size_t)(eq - argv[i]));
        name[eq - argv[i]] = 0;
        double expected = strtod(eq + 1, NULL);
        char buf[512];
        if (strncmp(name, "model.parameters.", 17) == 0) { /* the deck's value of a parameter, for the rerun check */
            snprintf(rerun_key, sizeof rerun_key, "%s", name);
            rerun_value = expected;
            continue;
        }
        if (strcmp(name, "samples") == 0) {
            size_t n = 0;
            call(run, ms_run_spectrum_size(run, &n), "spectrum_size");
            if ((double)n != expected) { snprintf(buf, sizeof buf, "%zu, expected %.0f", n, expected); fail("samples", buf); }
            continue;
        }
        if (strcmp(name, "flags") == 0) {
            size_t n = ms_run_flag_count(run);
            if ((double)n != expected) { snprintf(buf, sizeof buf, "%zu, expected %.0f", n, expected); fail("flags", buf); }
            continue;
        }
        if (strcmp(name, "tolerance_met") == 0) {
            int met = -1;
            call(run, ms_run_tolerance_met(run, &met), "tolerance_met");
            if ((double)met != expected) { snprintf(buf, sizeof buf, "%d, expected %.0f", met, expected); fail("tolerance_met", buf); }
            continue;
        }
        double got = NAN;
        int is_error = strncmp(name, "error.", 6) == 0;
        if (call(run, is_error ? ms_run_value_error(run, name + 6, &got) : ms_run_value(run, name, &got), name)) continue;
        double rel = fabs(got - expected) / fmax(fabs(expected), 1e-300);
        printf("%-16s library %.17g  summary.json %.17g  rel %.2e\n", name, got, expected, rel);
        if (!(rel <= 1e-9) && !(isnan(got) && isnan(expected))) {
            snprintf(buf, sizeof buf, "library %.17g, summary.json %.17g (rel %.2e)", got, expected, rel);
            fail(name, buf);
        }
    }

    /* Change a parameter, rerun, set it back, rerun: bit-identical to the first run (no state leaks between runs). */
    if (rerun_key[0]) {
        double ns0, as0, ns1 = NAN, ns2 = NAN, as2 = NAN;
        ms_run_value(run, "n_s", &ns0);
        ms_run_value(run, "A_s", &as0);
        call(run, ms_run_set_number(run, rerun_key, rerun_value * 1.1), "set changed");
        if (!call(run, ms_run_pivot(run), "pivot changed")) ms_run_value(run, "n_s", &ns1);
        call(run, ms_run_set_number(run, rerun_key, rerun_value), "set back");
        if (!call(run, ms_run_spectrum(run), "spectrum back")) {
            ms_run_value(run, "n_s", &ns2);
            ms_run_value(run, "A_s", &as2);
        }
        printf("rerun: %s x1.1 gives n_s %.17g; set back gives %.17g (first run %.17g)\n", rerun_key, ns1, ns2, ns0);
        if (ns1 == ns0) fail("rerun", "changing the parameter did not change n_s");
        if (ns2 != ns0 || as2 != as0) fail("rerun", "the parameter set back does not reproduce the first run bit for bit");
    }
    ms_run_free(run);
    if (failures) fprintf(stderr, "%d check(s) failed\n", failures);
    else printf("check_values: all agree\n");
    return failures ? 1 : 0;
}
