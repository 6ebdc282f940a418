"""Physics: pure functions on plain SI floats (water, wave speed, friction, demand, surge).

Modules: ``constants`` (unit factors), ``water`` (IAPWS-IF97 properties), ``wave_speed``
(Korteweg), ``friction`` (Darcy-Weisbach, Colebrook), ``demand`` (Hunter's curves),
``surge`` (Joukowsky, Michaud, junctions), ``gas_cushion`` (energy method). Nothing is imported
here, so importing one module never pulls in iapws unless it needs it. Equations and sources:
docs/methods.md.
"""
