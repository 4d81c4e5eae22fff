build/obj/report.o: src/report.c include/kphi/report.h include/kphi/eos.h \
 include/kphi/error.h include/kphi/species.h include/kphi/equil.h \
 include/kphi/rxnset.h src/internal.h include/kphi/thermo.h \
 include/kphi/units.h
include/kphi/report.h:
include/kphi/eos.h:
include/kphi/error.h:
include/kphi/species.h:
include/kphi/equil.h:
include/kphi/rxnset.h:
src/internal.h:
include/kphi/thermo.h:
include/kphi/units.h:
