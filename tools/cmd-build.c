#include "tool.h"

#include <string.h>

/* Make syntax: spaces and '#' escaped with a backslash, '$' doubled. */
static void put_make_name(FILE *file, const char *name)
{
	for (const char *p = name; *p; p++) {
		if (*p == ' ' || *p == '#' || *p == '\\')
			fputc('\\', file);
		else if (*p == '$')
			fputc('$', file);
		fputc(*p, file);
	}
}

/* "OUTDIR/checksums.sha256 OUTDIR/...: DESCRIPTION FONTS..." */
static bool write_depfile(const struct tool_options *options,
			  const struct gp_build *build)
{
	FILE *file = fopen(options->depfile, "w");
	if (!file)
		return false;
	const char *written = gp_build_written(build);
	for (const char *p = written; *p;) {
		const char *end = strchr(p, '\n');
		char name[512];
		snprintf(name, sizeof(name), "%s/%.*s", options->output,
			 (int)(end - p), p);
		put_make_name(file, name);
		fputc(end[1] ? ' ' : ':', file);
		p = end + 1;
	}
	fputc(' ', file);
	put_make_name(file, options->description);
	const char *inputs = gp_build_inputs(build);
	for (const char *p = inputs; *p;) {
		const char *end = strchr(p, '\n');
		char name[1024];
		snprintf(name, sizeof(name), "%.*s", (int)(end - p), p);
		fputs(" \\\n  ", file);
		put_make_name(file, name);
		p = end + 1;
	}
	fputc('\n', file);
	return fclose(file) == 0;
}

int cmd_build(const struct tool_options *options)
{
	long long epoch = 0;
	int has_epoch = tool_source_date_epoch(&epoch);
	if (has_epoch < 0)
		return EXIT_BAD_INPUT;
	struct gp_diag *diag = gp_diag_create();
	if (!diag)
		return tool_usage_error("out of memory");
	tool_progress("loading", (void *)options);
	struct gp_design *design =
		tool_load(options, NULL, options->overrides,
			  options->override_count, diag);
	struct gp_build *build =
		design ? gp_build_create_with_progress(
				 design, tool_progress, (void *)options, diag)
		       : NULL;
	int status = EXIT_BAD_INPUT;
	if (build && has_epoch)
		gp_build_set_epoch(build, epoch);
	if (build && options->show && !gp_build_show(build, options->show, diag)) {
		gp_build_destroy(build);
		build = NULL;
	}
	if (build && (!options->only ||
		      gp_build_select(build, options->only, diag)) &&
	    gp_build_write(build, options->output, diag)) {
		/* the artwork is written either way; findings that block
		 * manufacture (see report.txt) make the status 1 */
		status = gp_build_check_status(build, options->strict)
				 ? EXIT_FINDINGS
				 : EXIT_OK;
		if (options->depfile && !write_depfile(options, build))
			status = tool_usage_error("%s: cannot write the "
						  "dependency file",
						  options->depfile);
		tool_progress(NULL, (void *)options);
		if (options->json)
			fputs(gp_build_summary_json(build), stdout);
		else if (options->verbosity >= 0)
			fputs(gp_build_summary(build), stdout);
	}
	if (design)
		tool_print_diag(diag, options->verbosity);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_destroy(diag);
	return status;
}
