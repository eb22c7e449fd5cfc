#include "tool.h"

#include <errno.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

void tool_put(const char *text, FILE *file)
{
	char *safe = gp_text_for_terminal(text, true);
	fputs(safe ? safe : "(out of memory)\n", file);
	free(safe);
}

int tool_usage_error(const char *format, ...)
{
	va_list args;
	va_start(args, format);
	char text[2048];
	vsnprintf(text, sizeof(text), format, args);
	va_end(args);
	char *safe = gp_text_for_terminal(text, false);
	fprintf(stderr, "glassplot: %s\n", safe ? safe : text);
	free(safe);
	return EXIT_BAD_INPUT;
}

/* Does the message start with a place, "FILE:LINE:COL: " or "--set #N: "? */
static bool has_place(const char *message)
{
	if (strncmp(message, "--set #", 7) == 0)
		return true;
	const char *colon = strchr(message, ':');
	for (int field = 0; colon && field < 2; field++) {
		const char *p = colon + 1;
		if (*p < '0' || *p > '9')
			return false;
		while (*p >= '0' && *p <= '9')
			p++;
		if (*p != ':')
			return false;
		colon = p;
	}
	return colon != NULL;
}

void tool_print_diag(const struct gp_diag *diag, int verbosity)
{
	for (size_t i = 0; i < gp_diag_count(diag); i++) {
		enum gp_severity severity = gp_diag_severity(diag, i);
		if (severity == GP_SEVERITY_NOTE && verbosity < 1)
			continue;
		if (severity == GP_SEVERITY_WARNING && verbosity < 0)
			continue;
		const char *kind = severity == GP_SEVERITY_ERROR   ? ""
				   : severity == GP_SEVERITY_WARNING ? "warning: "
								     : "note: ";
		const char *message = gp_diag_message(diag, i);
		const char *code = gp_diag_code(diag, i);
		char *safe = gp_text_for_terminal(message, false);
		fprintf(stderr, "%s%s%s%s%s%s\n",
			has_place(message) ? "" : "glassplot: ", kind,
			safe ? safe : "(out of memory)", *code ? " [" : "", code,
			*code ? "]" : "");
		free(safe);
	}
}

/* "  -o, --output DIR" padded to the help column. */
static void print_option(const struct tool_option *option, FILE *out)
{
	char left[64];
	snprintf(left, sizeof(left), "  %c%c%s--%s%s%s",
		 option->short_name ? '-' : ' ',
		 option->short_name ? option->short_name : ' ',
		 option->short_name ? ", " : "  ", option->long_name,
		 option->argument ? " " : "",
		 option->argument ? option->argument : "");
	fprintf(out, "%-23s", left);
	for (const char *p = option->help; *p;) {
		size_t length = strcspn(p, "\n");
		fprintf(out, "%s%.*s\n", p == option->help ? "" : "                       ",
			(int)length, p);
		p += length + (p[length] == '\n');
	}
}

void tool_print_help(const struct tool_command *command, FILE *out)
{
	if (!command) {
		fputs("usage: glassplot COMMAND [options] DESCRIPTION\n"
		      "       glassplot help [COMMAND | messages] | --help | "
		      "--version\n\n"
		      "Electrode artwork for custom passive LCD glass.\n\n"
		      "commands:\n",
		      out);
		for (size_t i = 0; i < tool_command_count; i++)
			fprintf(out, "  %-8s %s\n", tool_commands[i].name,
				tool_commands[i].summary);
		fputs("\n'glassplot help COMMAND' (or 'glassplot COMMAND "
		      "--help') describes each command.\n"
		      "Exit status: 0 ok, 1 findings that block manufacture, "
		      "2 bad input or usage.\n",
		      out);
		return;
	}
	fprintf(out, "usage: glassplot %s %s\n\n%s\n\n", command->name,
		command->synopsis, command->about);
	for (const struct tool_option *o = command->options; o->long_name; o++)
		print_option(o, out);
	fprintf(out, "\n%s\n", command->exit_status);
}

/* --- parsing ------------------------------------------------------------ */

struct parse {
	const struct tool_command *command;
	struct tool_options *options;
	bool given[OPTION_COUNT];
	const char *operands[3];
	int operand_count;
};

static int parse_error(const struct parse *parse, const char *format, ...)
	__attribute__((format(printf, 2, 3)));

/* "glassplot: CMD: text; see 'glassplot help CMD'" */
static int parse_error(const struct parse *parse, const char *format, ...)
{
	char text[512];
	va_list args;
	va_start(args, format);
	vsnprintf(text, sizeof(text), format, args);
	va_end(args);
	return tool_usage_error("%s: %s; see 'glassplot help %s'",
				parse->command->name, text,
				parse->command->name);
}

static const struct tool_option *find_long(const struct tool_command *command,
					   const char *name, size_t length)
{
	for (const struct tool_option *o = command->options; o->long_name; o++)
		if (strlen(o->long_name) == length &&
		    strncmp(o->long_name, name, length) == 0)
			return o;
	return NULL;
}

static const struct tool_option *find_short(const struct tool_command *command,
					    char name)
{
	for (const struct tool_option *o = command->options; o->long_name; o++)
		if (o->short_name == name)
			return o;
	return NULL;
}

/* An option no command takes, or one that another command takes. */
static int unknown_option(const struct parse *parse, const char *arg,
			  size_t length)
{
	for (size_t i = 0; i < tool_command_count; i++) {
		const struct tool_command *other = &tool_commands[i];
		bool known = arg[1] == '-'
				     ? find_long(other, arg + 2, length - 2) != NULL
				     : length == 2 && find_short(other, arg[1]);
		if (known)
			return parse_error(parse,
					   "'%.*s' is not an option of '%s'",
					   (int)length, arg,
					   parse->command->name);
	}
	return parse_error(parse, "unknown option '%.*s'", (int)length, arg);
}

static bool add_override(struct tool_options *options, const char *text)
{
	const char **list = realloc(options->overrides,
				    (options->override_count + 1) *
					    sizeof(*list));
	if (!list)
		return false;
	options->overrides = list;
	list[options->override_count++] = text;
	return true;
}

/* Records one option; value is its argument or NULL. */
static int take(struct parse *parse, const struct tool_option *option,
		const char *spelling, const char *value)
{
	struct tool_options *o = parse->options;
	if (parse->given[option->id] && !option->repeatable)
		return parse_error(parse, "'%s' is given twice; give it once",
				   spelling);
	if (value && !*value)
		return parse_error(parse, "'%s' needs an argument (%s), not "
				   "an empty one", spelling, option->argument);
	parse->given[option->id] = true;
	switch (option->id) {
	case OPTION_OUTPUT: o->output = value; break;
	case OPTION_SET:
		if (!add_override(o, value))
			return tool_usage_error("out of memory");
		break;
	case OPTION_ONLY: o->only = value; break;
	case OPTION_FACES: o->faces = value; break;
	case OPTION_JSON: o->json = true; break;
	case OPTION_STRICT: o->strict = true; break;
	case OPTION_DEPFILE: o->depfile = value; break;
	case OPTION_PDF: o->pdf = value; break;
	case OPTION_SHOW: o->show = value; break;
	case OPTION_DPI: {
		char *end = NULL;
		double dpi = strtod(value, &end);
		if (*end || !(dpi >= 10 && dpi <= 2400))
			return parse_error(parse, "'%s' takes dots per inch "
					   "from 10 to 2400, not '%s'",
					   spelling, value);
		o->dpi = dpi;
		break;
	}
	case OPTION_QUIET: o->verbosity = -1; break;
	case OPTION_VERBOSE: o->verbosity = 1; break;
	case OPTION_HELP:
	case OPTION_COUNT: break;
	}
	return -1;
}

/* The option at argv[*i]; moves *i past its argument. */
static int parse_option(struct parse *parse, int argc, char **argv, int *i)
{
	const char *arg = argv[*i];
	size_t length = arg[1] == '-' ? strcspn(arg, "=") : 2;
	const struct tool_option *option =
		arg[1] == '-' ? find_long(parse->command, arg + 2, length - 2)
			      : find_short(parse->command, arg[1]);
	if (!option)
		return unknown_option(parse, arg, arg[1] == '-' ? length
								: strlen(arg));
	char spelling[64];
	snprintf(spelling, sizeof(spelling), "%.*s", (int)length, arg);
	const char *value = NULL;
	if (arg[length]) {
		if (!option->argument)
			return arg[1] == '-'
				       ? parse_error(parse, "'%s' takes no "
						     "argument", spelling)
				       : unknown_option(parse, arg, strlen(arg));
		value = arg + length + (arg[1] == '-');
	} else if (option->argument) {
		/* "-o --json": a forgotten argument, not a folder "--json" */
		const char *next = *i + 1 < argc ? argv[*i + 1] : NULL;
		if (!next || (next[0] == '-' && next[1]))
			return parse_error(parse, "'%s' needs an argument "
					   "(%s)", spelling, option->argument);
		value = argv[++*i];
	}
	return take(parse, option, spelling, value);
}

/* What must hold once every argument is read. */
static int parse_finish(struct parse *parse)
{
	const struct tool_command *c = parse->command;
	if (parse->given[OPTION_QUIET] && parse->given[OPTION_VERBOSE])
		return parse_error(parse, "'-q' and '-v' contradict each "
				   "other; give one");
	if (parse->operand_count < c->min_operands)
		return parse_error(parse, "expected %s", c->operands);
	if (parse->operand_count > c->max_operands)
		return parse_error(parse, "unexpected argument '%s'; expected "
				   "%s", parse->operands[c->max_operands],
				   c->operands);
	for (const struct tool_option *o = c->options; o->long_name; o++)
		if (o->required && !parse->given[o->id])
		{
			char name[64];
			if (o->short_name)
				snprintf(name, sizeof(name), "-%c",
					 o->short_name);
			else
				snprintf(name, sizeof(name), "--%s",
					 o->long_name);
			return parse_error(parse, "expected %s %s", name,
					   o->argument);
		}
	parse->options->description = parse->operands[0];
	parse->options->second = parse->operand_count > 1 ? parse->operands[1]
							   : NULL;
	return -1;
}

static bool wants_help(int argc, char **argv)
{
	for (int i = 1; i < argc && strcmp(argv[i], "--") != 0; i++)
		if (strcmp(argv[i], "--help") == 0 || strcmp(argv[i], "-h") == 0)
			return true;
	return false;
}

static int parse_arguments(struct parse *parse, int argc, char **argv)
{
	bool operands_only = false;
	for (int i = 1; i < argc; i++) {
		const char *arg = argv[i];
		if (!operands_only && strcmp(arg, "--") == 0) {
			operands_only = true;
		} else if (operands_only || arg[0] != '-' || !arg[1]) {
			if (parse->operand_count < 3)
				parse->operands[parse->operand_count++] = arg;
		} else {
			int status = parse_option(parse, argc, argv, &i);
			if (status >= 0)
				return status;
		}
	}
	return parse_finish(parse);
}

/* A folder to write into: there and a folder, or not there at all. */
static bool folder_usable(const char *path)
{
	struct stat st;
	return stat(path, &st) != 0 ? errno == ENOENT : S_ISDIR(st.st_mode);
}

/* A file to write: NULL when it is a plain file or not there in a folder
 * that is, else what is wrong. */
static const char *file_problem(const char *path)
{
	struct stat st;
	if (stat(path, &st) == 0)
		return S_ISREG(st.st_mode) ? NULL : "not a plain file";
	if (errno != ENOENT)
		return strerror(errno);
	const char *slash = strrchr(path, '/');
	if (!slash)
		return NULL;
	char folder[4096];
	snprintf(folder, sizeof(folder), "%.*s",
		 slash == path ? 1 : (int)(slash - path), path);
	return stat(folder, &st) == 0 && S_ISDIR(st.st_mode)
		       ? NULL
		       : "its folder is not there";
}

/* A value the library checks (a list of kinds, a set of files): -1 when
 * it is absent or good, else the exit status after its messages. */
static int check_with_library(const struct parse *parse, const char *option,
			      const char *value,
			      bool (*check)(const char *, struct gp_diag *))
{
	if (!value)
		return -1;
	struct gp_diag *diag = gp_diag_create();
	if (!diag)
		return tool_usage_error("out of memory");
	bool ok = check(value, diag);
	for (size_t i = 0; !ok && i < gp_diag_count(diag); i++)
		parse_error(parse, "%s: %s", option, gp_diag_message(diag, i));
	gp_diag_destroy(diag);
	return ok ? -1 : EXIT_BAD_INPUT;
}

/* Values that can be checked before any work. */
static int check_values(const struct parse *parse)
{
	const struct tool_options *o = parse->options;
	if (o->output && !folder_usable(o->output))
		return parse_error(parse, "-o %s: not a folder", o->output);
	const char *problem;
	if (o->depfile && (problem = file_problem(o->depfile)))
		return parse_error(parse, "--depfile %s: %s", o->depfile,
				   problem);
	if (o->pdf && (problem = file_problem(o->pdf)))
		return parse_error(parse, "--pdf %s: %s", o->pdf, problem);
	int status = check_with_library(parse, "--faces", o->faces,
					gp_faces_check);
	if (status < 0)
		status = check_with_library(parse, "--only", o->only,
					    gp_output_kinds_check);
	return status;
}

int tool_run(const struct tool_command *command, int argc, char **argv)
{
	if (wants_help(argc, argv)) {
		tool_print_help(command, stdout);
		return EXIT_OK;
	}
	struct tool_options options;
	memset(&options, 0, sizeof(options));
	struct parse parse = { .command = command, .options = &options };
	int status = parse_arguments(&parse, argc, argv);
	if (status < 0)
		status = check_values(&parse);
	if (status < 0)
		status = command->run(&options);
	free(options.overrides);
	return status;
}

/* --- shared by the commands --------------------------------------------- */

struct gp_design *tool_load(const struct tool_options *options,
			    const char *path, const char *const *overrides,
			    size_t override_count, struct gp_diag *diag)
{
	struct gp_design *design = gp_design_load(
		path ? path : options->description, overrides, override_count,
		diag);
	/* on success the caller prints the messages with its own */
	if (!design)
		tool_print_diag(diag, options->verbosity);
	return design;
}

int tool_source_date_epoch(long long *epoch)
{
	const char *text = getenv("SOURCE_DATE_EPOCH");
	if (!text || !*text)
		return 0;
	char *end;
	long long value = strtoll(text, &end, 10);
	if (*end || text[0] < '0' || text[0] > '9' || value < 0 ||
	    value > 253402300799LL) {
		tool_usage_error("SOURCE_DATE_EPOCH='%s' is not a number of "
				 "seconds since 1970 (up to year 9999)", text);
		return -1;
	}
	*epoch = value;
	return 1;
}

static double seconds_since(const struct timespec *start)
{
	struct timespec now;
	clock_gettime(CLOCK_MONOTONIC, &now);
	return (double)(now.tv_sec - start->tv_sec) +
	       (double)(now.tv_nsec - start->tv_nsec) / 1e9;
}

/* With -v: each stage that ended, with its own time.  Else, on a terminal
 * only, the stage that starts once the run has lasted a second. */
void tool_progress(const char *stage, void *data)
{
	static struct timespec start, stage_start;
	static const char *previous;
	static bool started;
	if (!started) {
		clock_gettime(CLOCK_MONOTONIC, &start);
		stage_start = start;
		started = true;
	}
	const struct tool_options *options = data;
	double elapsed = seconds_since(&start);
	if (options->verbosity > 0) {
		if (previous)
			fprintf(stderr, "glassplot: %s: %.3f s\n", previous,
				seconds_since(&stage_start));
		previous = stage;
		clock_gettime(CLOCK_MONOTONIC, &stage_start);
	} else if (options->verbosity == 0 && stage && elapsed > 1.0 &&
		   isatty(2)) {
		fprintf(stderr, "glassplot: %s (%.1f s)\n", stage, elapsed);
	}
}
