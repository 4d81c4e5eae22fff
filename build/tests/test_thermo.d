build/tests/test_thermo: tests/test_thermo.c include/kphi/thermo.h \
 include/kphi/species.h include/kphi/error.h tests/testutil.h
include/kphi/thermo.h:
include/kphi/species.h:
include/kphi/error.h:
tests/testutil.h:
