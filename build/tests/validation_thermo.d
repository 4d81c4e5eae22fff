build/tests/validation_thermo: tests/validation_thermo.c \
 include/kphi/thermo.h include/kphi/species.h include/kphi/error.h \
 tests/testutil.h
include/kphi/thermo.h:
include/kphi/species.h:
include/kphi/error.h:
tests/testutil.h:
