build/obj/equil.o: src/equil.c include/kphi/equil.h include/kphi/eos.h \
 include/kphi/error.h include/kphi/species.h include/kphi/rxnset.h \
 include/kphi/thermo.h
include/kphi/equil.h:
include/kphi/eos.h:
include/kphi/error.h:
include/kphi/species.h:
include/kphi/rxnset.h:
include/kphi/thermo.h:
