build/tests/test_case: tests/test_case.c include/kphi/case.h \
 include/kphi/eos.h include/kphi/error.h include/kphi/species.h \
 include/kphi/rxnset.h tests/testutil.h
include/kphi/case.h:
include/kphi/eos.h:
include/kphi/error.h:
include/kphi/species.h:
include/kphi/rxnset.h:
tests/testutil.h:
