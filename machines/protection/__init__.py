"""Protection setting rules: one module per protection function, plus one registry module per machine family
(``motor``, ``generator``) listing the rules in sheet order."""
