/* Shared helpers for the Check suites. Tests run from the repository root. */
#ifndef KPHI_TESTUTIL_H
#define KPHI_TESTUTIL_H

#include <check.h>
#include <gsl/gsl_errno.h>
#include <stdlib.h>

/* main() for a test program made of one suite: turns GSL's aborting handler off (the
 * library never touches it) and returns nonzero when any test fails. */
#define KPHI_TEST_MAIN(make_suite)                                                            \
    int main(void)                                                                            \
    {                                                                                         \
        gsl_set_error_handler_off();                                                          \
        SRunner *sr = srunner_create(make_suite());                                           \
        srunner_run_all(sr, CK_NORMAL);                                                       \
        int failed = srunner_ntests_failed(sr);                                               \
        srunner_free(sr);                                                                     \
        return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;                                     \
    }

#define KPHI_SPECIES_FILE "reactions/species.yaml"

#endif /* KPHI_TESTUTIL_H */
