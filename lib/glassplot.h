/* glassplot: electrode artwork for custom passive LCD glass.
 *
 * The one public header.  Lengths are int64_t nanometres in the glass frame
 * (x right, y up); descriptions write them as decimal millimetres.  The
 * library never prints and never exits: errors are recorded in a
 * struct gp_diag the caller owns. */
#ifndef GLASSPLOT_H
#define GLASSPLOT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

#if defined(GP_BUILDING_LIBRARY)
#define GP_EXPORT __attribute__((visibility("default")))
#else
#define GP_EXPORT
#endif

enum gp_severity {
	GP_SEVERITY_NOTE,
	GP_SEVERITY_WARNING,
	GP_SEVERITY_ERROR,
};

struct gp_diag;
struct gp_design;
struct gp_build;

/* Version string of the library, "MAJOR.MINOR.PATCH". */
GP_EXPORT const char *gp_version(void);

/* --- diagnostics ------------------------------------------------------- */
GP_EXPORT struct gp_diag *gp_diag_create(void);
GP_EXPORT void gp_diag_destroy(struct gp_diag *diag);
GP_EXPORT size_t gp_diag_count(const struct gp_diag *diag);
GP_EXPORT size_t gp_diag_error_count(const struct gp_diag *diag);
/* The i-th message, one line, "FILE:LINE:COL: text" when it has a place. */
GP_EXPORT const char *gp_diag_message(const struct gp_diag *diag, size_t i);
GP_EXPORT enum gp_severity gp_diag_severity(const struct gp_diag *diag,
					    size_t i);
/* The i-th message's stable code ("unknown-key"; see glassplot help
 * messages), "" for a message that has none, NULL past the end. */
GP_EXPORT const char *gp_diag_code(const struct gp_diag *diag, size_t i);
/* The registry: code and meaning of the n-th message kind (from 0), NULL
 * past the last. */
GP_EXPORT const char *gp_message_code_at(size_t n, const char **meaning);

/* --- loading a description --------------------------------------------- */
/* Reads a description file and applies overrides ("key.path=value", in
 * order).  Returns NULL when anything is wrong; diag says where and why. */
GP_EXPORT struct gp_design *gp_design_load(const char *path,
					   const char *const *overrides,
					   size_t override_count,
					   struct gp_diag *diag);
/* The same from memory; name is used in messages. */
GP_EXPORT struct gp_design *gp_design_load_buffer(const char *name,
						  const char *data,
						  size_t size,
						  const char *const *overrides,
						  size_t override_count,
						  struct gp_diag *diag);
GP_EXPORT void gp_design_destroy(struct gp_design *design);

/* --- design-rule and electrical checks (run by every build) ------------- */
/* Findings of the checks. */
GP_EXPORT size_t gp_build_check_errors(const struct gp_build *build);
GP_EXPORT size_t gp_build_check_warnings(const struct gp_build *build);
/* The check report as text (one line per finding) or as JSON (the
 * content of report.json); owned by the build. */
GP_EXPORT const char *gp_build_check_text(const struct gp_build *build);
GP_EXPORT const char *gp_build_check_json(const struct gp_build *build);
/* 1 when there are errors (with strict, also warnings), else 0. */
GP_EXPORT int gp_build_check_status(const struct gp_build *build,
				    bool strict);

/* --- building ------------------------------------------------------------ */
/* Lays out and routes the design.  Returns NULL on failure. */
GP_EXPORT struct gp_build *gp_build_create(const struct gp_design *design,
					   struct gp_diag *diag);
/* The same, calling progress(stage, data) as each stage starts, so that a
 * program can show progress on long runs. */
GP_EXPORT struct gp_build *gp_build_create_with_progress(
	const struct gp_design *design,
	void (*progress)(const char *stage, void *data), void *data,
	struct gp_diag *diag);
/* Dates in the outputs come from epoch (seconds, as SOURCE_DATE_EPOCH);
 * without it no output carries a date. */
GP_EXPORT void gp_build_set_epoch(struct gp_build *build, int64_t epoch);
/* With a path, gp_build_write also writes a make/ninja dependency file
 * there (every output depends on the description and on every font read):
 * staged beside path before the outputs are committed and renamed into
 * place after them, so that when it cannot be written nothing is.  path
 * is borrowed until then; NULL turns it off. */
GP_EXPORT void gp_build_set_depfile(struct gp_build *build, const char *path);
/* Write only these kinds of output: a comma-separated list of gerber,
 * proof, pins, firmware, report (checksums.sha256 is always written).
 * False, with a message, for a list gp_output_kinds_check refuses. */
GP_EXPORT bool gp_build_select(struct gp_build *build, const char *kinds,
			       struct gp_diag *diag);
/* The same check of a list of kinds without a build, so that a program
 * can refuse a bad list before any work: an empty list, an empty item, an
 * unknown kind and a kind listed twice are errors. */
GP_EXPORT bool gp_output_kinds_check(const char *kinds, struct gp_diag *diag);
/* Which Gerber sets to write: "viewer" (NAME.gbr, every layer as the
 * viewer sees the glass; the default), "coated" (NAME-coated.gbr, every
 * layer as seen looking at its plate's coated face, where the mask or
 * screen lies: the front plate's layers mirrored about the vertical line
 * through the front plate's centre, the back plate's as the viewer's) or
 * "both".  False, with a message, for anything else. */
GP_EXPORT bool gp_build_set_faces(struct gp_build *build, const char *which,
				  struct gp_diag *diag);
/* The same check without a build, for refusing a bad value early. */
GP_EXPORT bool gp_faces_check(const char *which, struct gp_diag *diag);
/* Files read besides the description (fonts...), one per line. */
GP_EXPORT const char *gp_build_inputs(const struct gp_build *build);
GP_EXPORT void gp_build_destroy(struct gp_build *build);
/* Writes every output into folder, all or nothing.  Afterwards the
 * summary ends with the list of files written. */
GP_EXPORT bool gp_build_write(struct gp_build *build, const char *folder,
			      struct gp_diag *diag);
/* Content to preview lit: "ROW=DIGITS", "BLOCK=TEXT" ('|' between
 * lines), icon names, separated by ';' (README, "Previews").  The proof
 * then has a sheet of the glass lit with it, through the (common,
 * segment) pairs of the firmware map.  False with errors in diag. */
GP_EXPORT bool gp_build_show(struct gp_build *build, const char *spec,
			     struct gp_diag *diag);
/* Writes the glass lit with the content of gp_build_show as a PNG of dpi
 * dots per inch to path (all or nothing). */
GP_EXPORT bool gp_build_write_preview(const struct gp_build *build,
				      const char *path, double dpi,
				      struct gp_diag *diag);
/* A short human summary (plates, blocks, nets, pixels, files), owned by
 * the build, valid until it is destroyed. */
GP_EXPORT const char *gp_build_summary(const struct gp_build *build);
/* The same summary as a JSON object, owned by the build (made again by
 * each gp_build_write, whose files it lists). */
GP_EXPORT const char *gp_build_summary_json(const struct gp_build *build);
/* Names of the files written by the last gp_build_write, one per line. */
GP_EXPORT const char *gp_build_written(const struct gp_build *build);

/* --- the outputs in memory ---------------------------------------------- */
struct gp_outputs;
/* Renders every output gp_build_write would write (the same bytes, the
 * same names, checksums.sha256 included; the dependency file is not one
 * of them) into memory, touching no file.  NULL on failure. */
GP_EXPORT struct gp_outputs *gp_build_render(const struct gp_build *build,
					     struct gp_diag *diag);
GP_EXPORT void gp_outputs_destroy(struct gp_outputs *outputs);
/* Number of files, and the i-th one's plain name ("front-ito.gbr"). */
GP_EXPORT size_t gp_outputs_count(const struct gp_outputs *outputs);
GP_EXPORT const char *gp_outputs_name(const struct gp_outputs *outputs,
				      size_t i);
/* The i-th file's bytes and size, owned by outputs; NULL (size 0) out of
 * range.  The bytes are followed by a NUL not counted in size. */
GP_EXPORT const void *gp_outputs_data(const struct gp_outputs *outputs,
				      size_t i, size_t *size);
/* The file called name, or NULL (size 0) when the build has none. */
GP_EXPORT const void *gp_outputs_find(const struct gp_outputs *outputs,
				      const char *name, size_t *size);

/* --- comparing two builds ---------------------------------------------- */
struct gp_diff;
/* Compares, per layer and per net, what was added, removed, moved or
 * reshaped between two builds.  Both builds must outlive the call only. */
GP_EXPORT struct gp_diff *gp_diff_create(const struct gp_build *old_build,
					 const struct gp_build *new_build,
					 struct gp_diag *diag);
GP_EXPORT void gp_diff_destroy(struct gp_diff *diff);
GP_EXPORT bool gp_diff_identical(const struct gp_diff *diff);
/* One line per change, then a count; owned by the diff. */
GP_EXPORT const char *gp_diff_text(const struct gp_diff *diff);
/* A PDF page with the changed areas in colour. */
GP_EXPORT bool gp_diff_write_pdf(const struct gp_diff *diff, const char *path,
				 struct gp_diag *diag);

/* --- drive and optics ------------------------------------------------------ */
enum gp_drive_output {
	GP_DRIVE_TEXT,
	GP_DRIVE_JSON,
};
/* The drive and ordering-spec report of the design (multiplex voltages,
 * Vop window, bias ladder, temperature, timing, ordering fields) as UTF-8
 * text or JSON.  Returns a string to release with free(), or NULL on bad
 * input (diag says where and why).  *feasible becomes false when no Vop
 * can switch the fluid at this duty; the report and an error in diag then
 * say what would work. */
GP_EXPORT char *gp_drive_report_create(const struct gp_design *design,
				       enum gp_drive_output output,
				       bool *feasible, struct gp_diag *diag);

/* --- text for a terminal --------------------------------------------------- */
/* text with every control character (escape sequences start with one),
 * bidi control and byte that is not UTF-8 written as visible "\u{XXXX}";
 * newlines and tabs are kept when keep_lines.  Release with free(); NULL
 * when out of memory. */
GP_EXPORT char *gp_text_for_terminal(const char *text, bool keep_lines);

#ifdef __cplusplus
}
#endif

#endif
