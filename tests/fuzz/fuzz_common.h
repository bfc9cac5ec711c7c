/* fuzz_common.h - what the fuzz entries share: the input bytes written to a
 * file (the readers take paths), and the checks that turn a bad answer into a crash. */
#ifndef PS_FUZZ_COMMON_H
#define PS_FUZZ_COMMON_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "core/diag.h"

/* The libFuzzer entry each fuzz_*.c defines; replay.c calls it without libFuzzer. */
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

/* Write data to the file `name` in this process's own temporary directory
 * (made once, removed at exit) and return its path (static storage). Aborts
 * when the file cannot be written: that is the machine, not the input. */
const char *ps_fuzz_file(const uint8_t *data, size_t size, const char *name);

/* Abort with "plantsieve fuzz: what" on stderr unless ok. */
void ps_fuzz_require(bool ok, const char *what);

/* A clear error: a status other than PS_OK comes with a non-empty, terminated
 * text. Aborts otherwise. */
void ps_fuzz_require_clear(ps_status st, const ps_diag *d, const char *what);

#endif
