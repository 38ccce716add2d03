/*
 * kernel_check.h — what the C kernel test files share: the check counter and the seeded
 * generator of test_kernels.c, and each further file's entry point.
 */
#ifndef STEEP_KERNEL_CHECK_H
#define STEEP_KERNEL_CHECK_H

/* Counts a passed or failed check; a failure prints `what` and the generator's state. */
void check(int ok, const char *what);

/* Uniform in [-1, 1), seeded (deterministic across runs). */
double rnd(void);

void test_airy(void);   /* test_airy.c */

#endif
