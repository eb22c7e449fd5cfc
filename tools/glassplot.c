/* glassplot: the command-line front of the library. */
#include "tool.h"

#include <string.h>

struct command {
	const char *name;
	int (*run)(int argc, char **argv);
	const char *summary;
};

static const struct command commands[] = {
	{ "build", cmd_build, "write the artwork set for a description" },
	{ "check", cmd_check, "run the design-rule and electrical checks" },
	{ "diff", cmd_diff, "compare two revisions of a glass" },
	{ "drive", cmd_drive, "print the drive voltages and ordering spec" },
};

static void print_help(void)
{
	printf("usage: glassplot COMMAND [options] DESCRIPTION\n"
	       "       glassplot --version | --help\n\n"
	       "Electrode artwork for custom passive LCD glass.\n\n"
	       "commands:\n");
	for (size_t i = 0; i < sizeof(commands) / sizeof(commands[0]); i++)
		printf("  %-8s %s\n", commands[i].name, commands[i].summary);
	printf("\n'glassplot COMMAND --help' describes each command.\n"
	       "Exit status: 0 ok, 1 findings that block manufacture, "
	       "2 bad input or usage.\n");
}

int main(int argc, char **argv)
{
	if (argc < 2)
		return tool_usage_error("expected a command; see 'glassplot "
					"--help'");
	if (strcmp(argv[1], "--help") == 0 || strcmp(argv[1], "-h") == 0 ||
	    strcmp(argv[1], "help") == 0) {
		print_help();
		return EXIT_OK;
	}
	if (strcmp(argv[1], "--version") == 0) {
		printf("glassplot %s\n", gp_version());
		return EXIT_OK;
	}
	for (size_t i = 0; i < sizeof(commands) / sizeof(commands[0]); i++)
		if (strcmp(argv[1], commands[i].name) == 0)
			return commands[i].run(argc - 1, argv + 1);
	return tool_usage_error("unknown command '%s'; see 'glassplot --help'",
				argv[1]);
}
