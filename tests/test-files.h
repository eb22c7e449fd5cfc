/* Environment and scratch folders for the test programs (fixtures.c). */
#ifndef GP_TEST_FILES_H
#define GP_TEST_FILES_H

/* The value of an environment variable meson sets for the tests; fails the
 * test when it is missing. */
const char *fixture_env(const char *name);
/* A new empty folder under GP_TEST_TMP named PREFIX-XXXXXX; free() it. */
char *fixture_temporary_folder(const char *prefix);
/* Removes a folder and everything in it, read-only parts too. */
void fixture_remove_tree(const char *path);

#endif
