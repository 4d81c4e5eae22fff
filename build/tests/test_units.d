build/tests/test_units: tests/test_units.c include/kphi/units.h \
 include/kphi/error.h tests/testutil.h
include/kphi/units.h:
include/kphi/error.h:
tests/testutil.h:
