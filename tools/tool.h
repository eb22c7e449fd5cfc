/* Shared pieces of the glassplot commands. */
#ifndef GP_TOOL_H
#define GP_TOOL_H

#include "glassplot.h"

#include <stdbool.h>
#include <stdio.h>

enum {
	EXIT_OK = 0,
	EXIT_FINDINGS = 1,   /* findings that block manufacture */
	EXIT_BAD_INPUT = 2,  /* bad input or usage */
};

/* Options every command that reads a description accepts. */
struct tool_options {
	const char *description;
	const char *output;          /* -o */
	const char **overrides;      /* --set, in order */
	size_t override_count;
	int verbosity;               /* -q: -1, default 0, -v: 1 */
	bool strict;
	bool json;                   /* --json: summary as JSON */
	const char *only;            /* --only KINDS */
	const char *depfile;         /* --depfile FILE */
};

/* Writes text made from the user's names (a summary, a report) with its
 * control and bidi characters made visible (gp_text_for_terminal). */
void tool_put(const char *text, FILE *file);
/* Prints each message of diag on stderr, one line each, prefixed by the
 * program name when it has no place of its own. */
void tool_print_diag(const struct gp_diag *diag, int verbosity);
/* Prints "glassplot: message" on stderr; returns EXIT_BAD_INPUT. */
int tool_usage_error(const char *format, ...)
	__attribute__((format(printf, 1, 2)));
/* Parses the common options; returns -1 to go on, else an exit code. */
int tool_parse(int argc, char **argv, struct tool_options *options,
	       const char *usage, bool wants_output);
void tool_options_finish(struct tool_options *options);
/* SOURCE_DATE_EPOCH, when set: true with *epoch; false when unset; exits
 * through a usage error (returned as -2) when malformed. */
int tool_source_date_epoch(long long *epoch);
/* Progress callback: prints stages on stderr when it is a terminal and
 * the run has lasted more than a second. */
void tool_progress(const char *stage, void *data);
/* The body of a command that reads one description: parses the common
 * options, then calls run with a fresh diagnostics object. */
int tool_main(int argc, char **argv, const char *usage, bool wants_output,
	      int (*run)(const struct tool_options *options,
			 struct gp_diag *diag));
/* Loads the description with the overrides, printing errors. */
struct gp_design *tool_load(const struct tool_options *options,
			    struct gp_diag *diag);

int cmd_build(int argc, char **argv);
int cmd_check(int argc, char **argv);
int cmd_diff(int argc, char **argv);
int cmd_drive(int argc, char **argv);

#endif
