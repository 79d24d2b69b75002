/*
 * check_errors DECK...
 *
 * Error handling of libmodesolver.so. For each DECK (the bad-input corpus), loads it and runs the whole pipeline,
 * and prints one line "DECK<TAB>CODE<TAB>MESSAGE" (the test compares these with the command line's exit code and
 * error line); a deck that does not fail, a code outside 2..3 or a message that is empty or not one line is a
 * failure here. Then checks misuse of the interface: NULL pointers, results before a run, an unknown result name,
 * a buffer too small, k outside the run's range; each must return its code with a message and never crash.
 * Exit 0 when all checks pass.
 */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "modesolver.h"

static int failures = 0;

static void expect(int got, int want, ms_run *run, const char *what) {
    const char *msg = run ? ms_run_error(run) : "";
    if (got != want) {
        fprintf(stderr, "FAIL %s: code %d, expected %d (%s)\n", what, got, want, msg ? msg : "(null)");
        failures++;
    } else if (run && want != MS_OK && (!msg || !msg[0] || strchr(msg, '\n'))) {
        fprintf(stderr, "FAIL %s: code %d without a one-line message\n", what, got);
        failures++;
    } else {
        printf("ok %s: %d %s\n", what, got, msg ? msg : "");
    }
}

static const char demo[] =
    "[model]\ncatalogue = \"starobinsky\"\n[pivot]\nefolds = 55\n[modes]\nk_min = 1e-4\nk_max = 1.0\ncount = 8\n";

int main(int argc, char **argv) {
    for (int i = 1; i < argc; i++) {
        ms_run *run = ms_run_new();
        int code = ms_run_load_deck_file(run, argv[i]);
        if (code == MS_OK) code = ms_run_spectrum(run);
        const char *msg = ms_run_error(run);
        printf("%s\t%d\t%s\n", argv[i], code, msg);
        if (code != MS_ERR_INPUT && code != MS_ERR_PHYSICS) {
            fprintf(stderr, "FAIL %s: code %d (expected 2 or 3): %s\n", argv[i], code, msg);
            failures++;
        }
        if (!msg[0] || strchr(msg, '\n')) {
            fprintf(stderr, "FAIL %s: the message is empty or not one line\n", argv[i]);
            failures++;
        }
        ms_run_free(run);
    }

    /* Misuse of the interface. */
    ms_run_free(NULL);
    expect(ms_run_pivot(NULL), MS_ERR_USAGE, NULL, "pivot on a NULL run");
    if (ms_run_error(NULL) != NULL) { fprintf(stderr, "FAIL ms_run_error(NULL) is not NULL\n"); failures++; }
    ms_run *run = ms_run_new();
    double v;
    size_t n;
    expect(ms_run_value(run, "n_s", &v), MS_ERR_USAGE, run, "a value before any run");
    expect(ms_run_spectrum_size(run, &n), MS_ERR_USAGE, run, "spectrum size before any run");
    expect(ms_run_load_deck(run, NULL, "x"), MS_ERR_USAGE, run, "NULL deck text");
    expect(ms_run_pivot(run), MS_ERR_INPUT, run, "running an empty input (no model)");
    expect(ms_run_load_deck(run, "[model\n", "broken.toml"), MS_ERR_INPUT, run, "TOML syntax error");
    expect(ms_run_set_number(run, "start.nothing", 1.0), MS_ERR_INPUT, run, "unknown number key");
    expect(ms_run_set_text(run, "start.phi0", "high"), MS_ERR_INPUT, run, "text for a number key");
    expect(ms_run_set_number(run, "modes.count", 2.5), MS_ERR_INPUT, run, "modes.count not whole");
    expect(ms_run_set_threads(run, -1), MS_ERR_USAGE, run, "negative threads");
    expect(ms_run_load_deck(run, demo, "demo"), MS_OK, run, "a good deck");
    expect(ms_run_pivot(run), MS_OK, run, "pivot");
    expect(ms_run_spectrum_size(run, &n), MS_ERR_USAGE, run, "spectrum size after a pivot-only run");
    expect(ms_run_value(run, "no_such_value", &v), MS_ERR_USAGE, run, "unknown result name");
    expect(ms_run_value(run, "n_s", NULL), MS_ERR_USAGE, run, "NULL output pointer");
    expect(ms_run_spectrum(run), MS_OK, run, "spectrum");
    expect(ms_run_spectrum_size(run, &n), MS_OK, run, "spectrum size");
    double k[64], ps[64];
    expect(n > 2 ? ms_run_spectrum_copy(run, k, ps, NULL, NULL, 2) : -1, MS_ERR_USAGE, run, "buffer too small");
    double outside[2] = {1e-3, 10.0};
    expect(ms_run_spectrum_at(run, outside, 2, ps, NULL), MS_ERR_INPUT, run, "k outside the run's range");
    expect(ms_run_set_number(run, "start.phi0", HUGE_VAL), MS_OK, run, "setting a value the run cannot use");
    expect(ms_run_pivot(run), MS_ERR_INPUT, run, "an infinite phi0");
    expect(ms_run_value(run, "n_s", &v), MS_ERR_USAGE, run, "a failed run drops the old result");
    expect(ms_run_unset(run, "start.phi0"), MS_OK, run, "unset phi0 (catalogue default again)");
    expect(ms_run_pivot(run), MS_OK, run, "pivot after unset");
    if (ms_run_flag(run, 1000) != NULL || ms_run_warning(run, 1000) != NULL) { fprintf(stderr, "FAIL index out of range\n"); failures++; }
    ms_run_free(run);

    if (failures) fprintf(stderr, "%d check(s) failed\n", failures);
    else printf("check_errors: all passed\n");
    return failures ? 1 : 0;
}
