// placeholder until the language server lands
