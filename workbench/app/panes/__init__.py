"""The views of the desk: System, Flows, Grade line, Run and Events."""
