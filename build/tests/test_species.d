build/tests/test_species: tests/test_species.c include/kphi/species.h \
 include/kphi/error.h tests/testutil.h
include/kphi/species.h:
include/kphi/error.h:
tests/testutil.h:
