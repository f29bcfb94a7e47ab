/** Stop at boot when NUXT_TRUSTED_PROXIES holds something that is neither an address nor a CIDR range. */
export default defineNitroPlugin(() => {
  try {
    trustedProxies()
  }
  catch (error) {
    console.error(`[config] ${(error as Error).message}`)
    process.exit(1)
  }
})
