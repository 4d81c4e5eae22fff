build/tests/test_rxnset: tests/test_rxnset.c include/kphi/rxnset.h \
 include/kphi/error.h include/kphi/species.h tests/testutil.h
include/kphi/rxnset.h:
include/kphi/error.h:
include/kphi/species.h:
tests/testutil.h:
