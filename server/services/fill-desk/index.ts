// The fill desk's public surface (the launch-side fill page's read): import from here, never from its files.
export * from './desk'
