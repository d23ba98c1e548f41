"""Device models of the passive dampers: geometry, frequency laws, absorber equivalents."""
