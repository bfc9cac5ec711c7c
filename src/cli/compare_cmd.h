/* compare_cmd.h - the compare command of the command line (compare_cmd.c). */
#ifndef PS_COMPARE_CMD_H
#define PS_COMPARE_CMD_H

/* Run `plantsieve compare`; argv[0] is "compare". Returns the exit code. */
int ps_cli_compare(int argc, char **argv);

#endif
