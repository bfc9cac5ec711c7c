/* support.h - helpers shared by the unit tests. */
#ifndef PS_TEST_SUPPORT_H
#define PS_TEST_SUPPORT_H

#include <stddef.h>

/* Turn GSL's aborting handler off (call from every suite's .init). */
void ps_test_init(void);

/* Write text to a fresh temporary file whose name ends in suffix; returns a
 * static path (valid until the next call). */
const char *ps_test_write_temp(const char *suffix, const char *text);

#endif
