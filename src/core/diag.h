/* diag.h - status codes and the diagnostic record every fallible call fills.
 * The library never prints: callers decide where a diagnostic goes. */
#ifndef PS_DIAG_H
#define PS_DIAG_H

#include <stdarg.h>
#include <stddef.h>

typedef enum ps_status {
    PS_OK = 0,
    PS_ERR_INPUT,     /* the catalog is wrong: the entry is rejected, the batch goes on */
    PS_ERR_SYNTAX,    /* the file cannot be parsed further (YAML/CSV structure broken) */
    PS_ERR_NUMERIC,   /* a numerical routine failed; recorded on the plant */
    PS_ERR_IO,        /* a file could not be opened, read or written */
    PS_ERR_NOMEM,
    PS_ERR_BUSY       /* another process holds what this one needs (the lock of a report set) */
} ps_status;

enum { PS_DIAG_TEXT = 512, PS_DIAG_FIELD = 48, PS_DIAG_FILE = 512 };

/* Where and why. line and col are 1-based; 0 means "not known". */
typedef struct ps_diag {
    char file[PS_DIAG_FILE];
    size_t line;
    size_t col;
    char field[PS_DIAG_FIELD];
    char text[PS_DIAG_TEXT];
} ps_diag;

/* Fill d (if not NULL) and return st. text is printf-style. */
ps_status ps_diag_set(ps_diag *d, ps_status st, size_t line, size_t col,
                      const char *field, const char *fmt, ...)
    __attribute__((format(printf, 6, 7)));

/* The same with a va_list, for callers that wrap their own variadic functions. */
ps_status ps_diag_vset(ps_diag *d, ps_status st, size_t line, size_t col, const char *field,
                       const char *fmt, va_list ap) __attribute__((format(printf, 6, 0)));

/* Clear d to "no diagnostic" but keep its file name. */
void ps_diag_clear(ps_diag *d);

/* The position that follows a file name in a message: ":LINE:COL", ":LINE"
 * when the column is not known (0), "" when the line is not known (a file
 * that cannot be opened), so that no message shows a position ":0:0" that
 * does not exist. OUT: out, n bytes (PS_DIAG_POS is enough); returns out. */
enum { PS_DIAG_POS = 48 };
const char *ps_diag_pos(char *out, size_t n, size_t line, size_t col);

/* The same in words for a sentence: "line LINE, column COL", "line LINE" or
 * "" (nothing known). OUT: out, n bytes (PS_DIAG_POS is enough); returns out. */
const char *ps_diag_pos_words(char *out, size_t n, size_t line, size_t col);

#endif
