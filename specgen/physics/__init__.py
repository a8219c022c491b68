"""Pure physics for wound magnetics: one published method per function, SI floats or numpy arrays.

Modules: ``wire`` (conductors, AWG, skin depth), ``geometry`` (IEC 60205 effective core
parameters, windows, mean turn lengths), ``faraday`` (Faraday's law, magnetizing current),
``gap`` (gapped inductors, fringing), ``permeability`` (powder-core DC-bias roll-off),
``dowell`` (AC resistance factor of layered windings), ``coreloss`` (Steinmetz, iGSE),
``thermal`` (temperature rise, IEC 60085 classes), ``sizing`` (area product).
Nothing here imports pint or scipy; units live in the parameter names.
"""
