// The front-door domain's public surface: the club's public page and its settings.
export * from './front-door'
