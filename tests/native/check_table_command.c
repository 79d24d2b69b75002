/*
 * check_table_command DECK COMMAND...
 *
 * The external-command coupling of a Boltzmann code: runs `COMMAND... spectrum DECK --table - --quiet` (e.g.
 * COMMAND = modesolver, or dotnet path/ModeSolver.Cli.dll) as a child process, parses the primordial table it
 * writes on stdout ('#' comment lines, then rows "k P_s P_t"), and checks every row against libmodesolver.so run
 * in-process on the same deck: P_s and P_t at the table's k to a relative 1e-8 (the table prints 11 significant
 * digits). Exit 0 when all rows agree.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "modesolver.h"

#define MAX_ROWS 100000

static double tk[MAX_ROWS], tps[MAX_ROWS], tpt[MAX_ROWS], lps[MAX_ROWS], lpt[MAX_ROWS];

int main(int argc, char **argv) {
    if (argc < 3) { fprintf(stderr, "usage: check_table_command DECK COMMAND...\n"); return 2; }
    char cmd[8192] = "";
    for (int i = 2; i < argc; i++) {
        strncat(cmd, "'", sizeof cmd - strlen(cmd) - 1);
        strncat(cmd, argv[i], sizeof cmd - strlen(cmd) - 1);
        strncat(cmd, "' ", sizeof cmd - strlen(cmd) - 1);
    }
    strncat(cmd, "spectrum '", sizeof cmd - strlen(cmd) - 1);
    strncat(cmd, argv[1], sizeof cmd - strlen(cmd) - 1);
    strncat(cmd, "' --table - --quiet", sizeof cmd - strlen(cmd) - 1);

    FILE *p = popen(cmd, "r");
    if (!p) { perror("popen"); return 1; }
    char line[4096];
    size_t n = 0, comments = 0;
    while (fgets(line, sizeof line, p)) {
        if (line[0] == '#') { comments++; continue; }
        if (n == MAX_ROWS) { fprintf(stderr, "FAIL: more than %d rows\n", MAX_ROWS); pclose(p); return 1; }
        if (sscanf(line, "%lf %lf %lf", &tk[n], &tps[n], &tpt[n]) != 3) {
            fprintf(stderr, "FAIL: row %zu is not 'k P_s P_t': %s", n + 1, line);
            pclose(p);
            return 1;
        }
        n++;
    }
    int status = pclose(p);
    if (status != 0) { fprintf(stderr, "FAIL: `%s` exited with status %d\n", cmd, status); return 1; }
    if (n < 2 || comments == 0) { fprintf(stderr, "FAIL: %zu rows and %zu comment lines\n", n, comments); return 1; }

    ms_run *run = ms_run_new();
    if (ms_run_load_deck_file(run, argv[1]) != MS_OK || ms_run_spectrum(run) != MS_OK) {
        fprintf(stderr, "FAIL: library: %s\n", ms_run_error(run));
        ms_run_free(run);
        return 1;
    }
    /* The table's first and last k are the deck's k_min and k_max printed to 11 digits: keep them inside. */
    double kmin = tk[0], kmax = tk[n - 1];
    if (ms_run_spectrum_at(run, &kmin, 1, NULL, NULL) != MS_OK) tk[0] *= 1 + 1e-10;
    if (ms_run_spectrum_at(run, &kmax, 1, NULL, NULL) != MS_OK) tk[n - 1] *= 1 - 1e-10;
    if (ms_run_spectrum_at(run, tk, n, lps, lpt) != MS_OK) {
        fprintf(stderr, "FAIL: spectrum_at: %s\n", ms_run_error(run));
        ms_run_free(run);
        return 1;
    }
    double worst = 0;
    size_t bad = 0;
    for (size_t i = 0; i < n; i++) {
        double es = fabs(lps[i] - tps[i]) / tps[i], et = fabs(lpt[i] - tpt[i]) / tpt[i];
        double e = fmax(es, et);
        if (e > worst) worst = e;
        if (!(e <= 1e-8)) {
            if (bad++ < 5) fprintf(stderr, "FAIL row %zu k = %.10e: table %.10e %.10e, library %.10e %.10e\n", i + 1, tk[i], tps[i], tpt[i], lps[i], lpt[i]);
        }
    }
    ms_run_free(run);
    printf("check_table_command: %zu rows, largest relative difference %.2e%s\n", n, worst, bad ? "" : " (all within 1e-8)");
    return bad ? 1 : 0;
}
