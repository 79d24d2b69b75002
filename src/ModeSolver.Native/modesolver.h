/*
 * modesolver.h: the C interface of libmodesolver.so (ModeSolver's pipeline in-process: deck -> background ->
 * pivot matching and normalisation -> Mukhanov-Sasaki modes -> spectra, slow-roll comparison and flags).
 *
 * Build the library (needs the .NET SDK; native AOT, no runtime needed afterwards):
 *     dotnet publish src/ModeSolver.Native -c Release -r linux-x64 -o DIR
 * which writes DIR/libmodesolver.so and DIR/modesolver.h. Compile against it:
 *     gcc -I DIR prog.c -L DIR -lmodesolver -Wl,-rpath,DIR -o prog
 *
 * Units: as in decks. k in 1/Mpc, P_s and P_t dimensionless (P_t sums both polarisations), field values and H in
 * reduced Planck units.
 *
 * Results: every function returning int returns one of the MS_* codes below. On failure the run keeps a one-line
 * message (ms_run_error): for codes 1 to 3 it is the message the command line prints after "modesolver: ", with
 * the same exit code. Nothing is printed and no file is written by the library.
 *
 * Ownership, in one place:
 *   - ms_run* is created by ms_run_new and owned by the caller until ms_run_free (which frees everything the run
 *     handed out). Passing a pointer that did not come from ms_run_new, or one already freed, is undefined.
 *   - Strings passed in (deck text, keys, values, paths) are read during the call only; the caller keeps them.
 *     They are NUL-terminated UTF-8.
 *   - Strings returned (ms_run_error, ms_run_flag, ms_run_warning) are owned by the run: valid until the next
 *     call on the same run (any function taking that ms_run*, except the read-only getters ms_run_error,
 *     ms_run_flag_count, ms_run_flag, ms_run_warning_count, ms_run_warning) or ms_run_free. Copy them to keep them.
 *   - ms_version's string is owned by the library and valid for the life of the process.
 *   - Arrays are the caller's: the library reads input arrays and writes output arrays during the call only.
 *
 * Threads: each run has its own lock. Different runs may be used from different threads at the same time; calls
 * on the same run from several threads are serialised (but a string returned to one thread is invalidated by
 * another thread's next call on that run). The modes of one spectrum run use ms_run_set_threads workers
 * (default 0: all cores); a sampler running one run per thread should set 1.
 */
#ifndef MODESOLVER_H
#define MODESOLVER_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Result codes. 1 to 3 are the command line's exit codes. */
#define MS_OK 0           /* success */
#define MS_ERR_INTERNAL 1 /* an internal error (a bug: please report it with the message) */
#define MS_ERR_INPUT 2    /* bad input: deck syntax, unknown key, wrong type, invalid formula, value out of range */
#define MS_ERR_PHYSICS 3  /* physics that cannot be computed (e.g. inflation never ends, k range not served) */
#define MS_ERR_USAGE 4    /* misuse: NULL pointer, result asked for before the run making it, buffer too small */

/* An opaque run: its input (parsed once), its last result, and the strings it handed out. */
typedef struct ms_run ms_run;

/* The library version, e.g. "0.3.0" (the same as the command line's). Owned by the library. */
const char *ms_version(void);

/* A new, empty run; NULL only when memory is exhausted. Free it with ms_run_free. */
ms_run *ms_run_new(void);

/* Frees the run and every string it handed out. NULL is allowed (does nothing). */
void ms_run_free(ms_run *run);

/* The last call's error message on this run, "" after a success. NULL only when run is NULL. Owned by the run. */
const char *ms_run_error(const ms_run *run);

/* ---- input ---- */

/* Replaces the run's input by deck text (TOML, the same keys as a deck file). source_name appears in messages
 * ("name:line: key problem"); NULL means "deck". Drops the last result. */
int ms_run_load_deck(ms_run *run, const char *toml_text, const char *source_name);

/* Replaces the run's input by the deck file at path (messages name the path as given). Drops the last result. */
int ms_run_load_deck_file(ms_run *run, const char *path);

/* Sets one deck key to a number, with the command line's override rules (the value set wins over the deck's; a
 * model source replaces the deck's; pivot.efolds replaces the deck's reheating and a reheating key replaces
 * pivot.efolds; start.efolds and start.phi0 replace each other). Keys: every deck key whose value is a number
 * (the settings table of docs/models-and-decks.md, made from the settings schema: [model], [start], [pivot],
 * [reheating], [normalisation] a_s and ln_10_10_a_s, [modes] (count a whole number), [output] table_h, the [flags]
 * thresholds, the numeric [observables] keys) and model.parameters.NAME. Values are checked when the run runs (or at
 * ms_run_check), with the deck's messages. The deck is not parsed again: this is the call for samplers. */
int ms_run_set_number(ms_run *run, const char *key, double value);

/* Sets one deck key to text (same rules). Keys: every deck key whose value is text, a switch ("true" or "false")
 * or a list (comma-separated, output.formats): title, model.catalogue, model.potential, model.kinetic,
 * model.coupling, model.palatini, normalisation.a_s ("none": no normalisation), normalisation.solve_for (a parameter
 * name: normalise by solving for it instead of rescaling V), output.dir, output.formats, flags.reference and the
 * [observables] keys (numbers as text too).
 * A model given by formulas: model.potential (and model.kinetic, model.coupling), model.parameters.NAME, start.phi0. */
int ms_run_set_text(ms_run *run, const char *key, const char *value);

/* Removes the value of a key (the default, or the catalogue's, applies again). */
int ms_run_unset(ms_run *run, const char *key);

/* Worker threads for the modes of a spectrum run: 0 (the default) for all cores, else 1 to 4096. */
int ms_run_set_threads(ms_run *run, int threads);

/* ---- running ---- */

/* Validates the input as `modesolver spectrum --check` does (settings resolved, theory valid at phi0); runs
 * nothing. Warnings are available afterwards. */
int ms_run_check(ms_run *run);

/* Background, pivot matching, normalisation and the exact pivot mode (as `modesolver background`). */
int ms_run_pivot(ms_run *run);

/* The whole pipeline on the deck's k (as `modesolver spectrum`, without writing files). */
int ms_run_spectrum(ms_run *run);

/* ---- results (of the last successful ms_run_pivot or ms_run_spectrum; a failed or new run drops them) ---- */

/* A named number. Names: A_s, n_s, r, alpha_s, n_t (exact values at the pivot), N_star, k_pivot [1/Mpc],
 * phi_star, H_star [M_pl], energy_scale_gev (V_*^(1/4)), V_scale (factor applied to V to reach A_s), N_total,
 * N_reh (NaN when N_* was given), rhs_per_mode (mean right-hand-side evaluations per mode), max_rel_error (the
 * largest estimated relative error of what was computed: the pivot mode after ms_run_pivot, every spectrum
 * sample and the pivot after ms_run_spectrum). MS_ERR_USAGE for an unknown name or when there is no result. */
int ms_run_value(ms_run *run, const char *name, double *value);

/* The estimated absolute error of a pivot value, in the value's own units (summary.json's "errors" object), so that
 * the value reads "value +- error". Names: A_s, n_s, alpha_s, r, n_t. NaN when not estimated. The same after
 * ms_run_pivot and ms_run_spectrum (both solve the same exact pivot mode). MS_ERR_USAGE for another name or when
 * there is no result. */
int ms_run_value_error(ms_run *run, const char *name, double *error);

/* *met = 1 when the last run met the requested tolerance (max_rel_error <= modes.tolerance; summary.json's
 * "tolerance_met"), else 0 (after ms_run_spectrum a warning then says so, as the command line prints). MS_ERR_USAGE
 * when there is no result. */
int ms_run_tolerance_met(ms_run *run, int *met);

/* Number of spectrum samples of the last ms_run_spectrum (the deck's k, plus the pivot when inside the range). */
int ms_run_spectrum_size(ms_run *run, size_t *size);

/* Copies the samples into caller arrays of at least `capacity` doubles (ms_run_spectrum_size of them are
 * written): k [1/Mpc, increasing], P_s, P_t, and the estimated relative error of P_s. Any array may be NULL
 * (skipped). MS_ERR_USAGE when capacity is too small. */
int ms_run_spectrum_copy(ms_run *run, double *k, double *p_s, double *p_t, double *rel_error, size_t capacity);

/* P_s and P_t at n caller wavenumbers k [1/Mpc] (any order), interpolated as the primordial table is (cubic
 * Hermite in ln k of ln P with the exact slopes). Every k must lie in the run's k range (modes.k_min to
 * modes.k_max); otherwise MS_ERR_INPUT naming the first k outside, and nothing is written. p_s or p_t may be NULL. */
int ms_run_spectrum_at(ms_run *run, const double *k, size_t n, double *p_s, double *p_t);

/* Slow-roll disagreement flags of the last ms_run_spectrum, one line each as "[kind] message". */
size_t ms_run_flag_count(const ms_run *run);
/* Flag i (0-based), or NULL when i is out of range. Owned by the run. */
const char *ms_run_flag(const ms_run *run, size_t i);

/* Warnings of the last run or check, one line each. */
size_t ms_run_warning_count(const ms_run *run);
/* Warning i (0-based), or NULL when i is out of range. Owned by the run. */
const char *ms_run_warning(const ms_run *run, size_t i);

#ifdef __cplusplus
}
#endif

#endif /* MODESOLVER_H */
