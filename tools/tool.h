/* Shared pieces of the glassplot commands: the table of commands and
 * their options (commands.c), the parser and the one error printer
 * (tool.c). */
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

/* Every option any command takes; each command lists its own. */
enum tool_option_id {
	OPTION_OUTPUT,
	OPTION_SET,
	OPTION_ONLY,
	OPTION_FACES,
	OPTION_JSON,
	OPTION_STRICT,
	OPTION_DEPFILE,
	OPTION_PDF,
	OPTION_SHOW,
	OPTION_DPI,
	OPTION_QUIET,
	OPTION_VERBOSE,
	OPTION_HELP,
	OPTION_COUNT,
};

/* One option as a command takes it. */
struct tool_option {
	enum tool_option_id id;
	char short_name;          /* 0: none */
	const char *long_name;    /* without the dashes */
	const char *argument;     /* "DIR"; NULL when it takes none */
	bool repeatable;          /* else given twice is an error */
	bool required;
	const char *help;         /* lines of the --help text, '\n' between */
};

/* What the parser found, for the command's run function. */
struct tool_options {
	const char *description;     /* first operand */
	const char *second;          /* second operand (diff NEW), or NULL */
	const char *output;          /* -o */
	const char **overrides;      /* --set, in order */
	size_t override_count;
	int verbosity;               /* -q: -1, default 0, -v: 1 */
	bool strict;
	bool json;
	const char *only;            /* --only KINDS, checked */
	const char *faces;           /* --faces WHICH, checked */
	const char *depfile;
	const char *pdf;
	const char *show;            /* --show SPEC */
	double dpi;                  /* --dpi, 0 when not given */
};

struct tool_command {
	const char *name;
	const char *summary;         /* one line for 'glassplot --help' */
	const char *synopsis;        /* what follows "glassplot NAME " */
	const char *about;           /* paragraph of the --help text */
	const char *operands;        /* "DESCRIPTION", for messages */
	int min_operands, max_operands;
	const struct tool_option *options; /* ended by a NULL long_name */
	const char *exit_status;     /* last paragraph of the --help text */
	int (*run)(const struct tool_options *options);
};

/* The commands, in the order 'glassplot --help' lists them. */
extern const struct tool_command tool_commands[];
extern const size_t tool_command_count;
const struct tool_command *tool_find_command(const char *name);

/* The one printer of errors: "glassplot: " and the text on stderr;
 * returns EXIT_BAD_INPUT. */
int tool_usage_error(const char *format, ...)
	__attribute__((format(printf, 1, 2)));
/* Writes text made from the user's names (a summary, a report) with its
 * control and bidi characters made visible (gp_text_for_terminal). */
void tool_put(const char *text, FILE *file);
/* Prints each message of diag on stderr, one line each: with its place
 * when it has one, else through the same "glassplot: " prefix. */
void tool_print_diag(const struct gp_diag *diag, int verbosity);
/* The --help text of a command, or of the program when command is NULL. */
void tool_print_help(const struct tool_command *command, FILE *out);

/* Parses argv (argv[0] is the command's name) against the command's own
 * options, checks every value that can be checked without reading the
 * description, then calls its run function.  Returns the exit status. */
int tool_run(const struct tool_command *command, int argc, char **argv);

/* SOURCE_DATE_EPOCH, when set: 1 with *epoch; 0 when unset; -1 after
 * printing an error when malformed. */
int tool_source_date_epoch(long long *epoch);
/* Progress callback: with -v every stage and its time on stderr; else
 * stages on a terminal once the run has lasted more than a second. */
void tool_progress(const char *stage, void *data);
/* Loads the description (or path when not NULL) with the overrides,
 * printing the errors when it fails. */
struct gp_design *tool_load(const struct tool_options *options,
			    const char *path, const char *const *overrides,
			    size_t override_count, struct gp_diag *diag);

int cmd_build(const struct tool_options *options);
int cmd_check(const struct tool_options *options);
int cmd_diff(const struct tool_options *options);
int cmd_drive(const struct tool_options *options);
int cmd_preview(const struct tool_options *options);

#endif
