/* sanitizer.h - whether this build runs under a sanitizer that replaces the
 * allocator (ASan, TSan), found by the compiler's own flags, not by test name. */
#ifndef PS_TEST_SANITIZER_H
#define PS_TEST_SANITIZER_H

/* gcc defines __SANITIZE_ADDRESS__ / __SANITIZE_THREAD__; clang 14 answers
 * __has_feature. The same flags build the library and the command line the
 * tests run, so the check also holds for a child process. */
#if defined(__SANITIZE_ADDRESS__) || defined(__SANITIZE_THREAD__)
#define PS_TEST_ALLOCATOR_REPLACED 1
#elif defined(__has_feature)
#if __has_feature(address_sanitizer) || __has_feature(thread_sanitizer)
#define PS_TEST_ALLOCATOR_REPLACED 1
#endif
#endif
#ifndef PS_TEST_ALLOCATOR_REPLACED
#define PS_TEST_ALLOCATOR_REPLACED 0
#endif

#endif
