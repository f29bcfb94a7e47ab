import ipaddr from 'ipaddr.js'

// Who is asking, as the sign-in limits see it. Pure functions: the caller passes the socket address,
// the X-Forwarded-For header and the parsed NUXT_TRUSTED_PROXIES list.

type Address = ipaddr.IPv4 | ipaddr.IPv6

/** One trusted proxy: an address with its prefix length (32 or 128 for a single address). */
export type TrustedRange = [Address, number]

/** Parses `text` as an address, IPv4-mapped IPv6 (`::ffff:10.0.0.1`) as the IPv4 it carries; null when it is none. */
function parseAddress(text: string): Address | null {
  // Only dotted quads: ipaddr.js would also read '127.1' or '0x7f000001' as IPv4.
  if (ipaddr.IPv4.isValidFourPartDecimal(text)) return ipaddr.IPv4.parse(text)
  if (!ipaddr.IPv6.isValid(text)) return null
  const parsed = ipaddr.IPv6.parse(text)
  return parsed.isIPv4MappedAddress() ? parsed.toIPv4Address() : parsed
}

/**
 * Parses NUXT_TRUSTED_PROXIES: addresses or CIDR ranges (IPv4 and IPv6), separated by commas or
 * white space. Throws on an entry that is neither, so a typing slip stops the server at boot
 * instead of silently trusting nobody (or everybody).
 */
export function parseTrustedProxies(setting: string | string[] | undefined | null): TrustedRange[] {
  const entries = (Array.isArray(setting) ? setting.join(',') : String(setting ?? '')).split(/[\s,]+/).filter(Boolean)
  return entries.map((entry): TrustedRange => {
    if (entry.includes('/')) {
      if (!ipaddr.isValidCIDR(entry)) throw new Error(`NUXT_TRUSTED_PROXIES: "${entry}" is not an address or CIDR range`)
      const [range, bits] = ipaddr.parseCIDR(entry)
      // A mapped range (::ffff:10.0.0.0/104) is the IPv4 range it maps.
      if (range.kind() === 'ipv6' && (range as ipaddr.IPv6).isIPv4MappedAddress() && bits >= 96) {
        return [(range as ipaddr.IPv6).toIPv4Address(), bits - 96]
      }
      return [range, bits]
    }
    const address = parseAddress(entry)
    if (!address) throw new Error(`NUXT_TRUSTED_PROXIES: "${entry}" is not an address or CIDR range`)
    return [address, address.kind() === 'ipv4' ? 32 : 128]
  })
}

function isTrusted(address: Address, trusted: TrustedRange[]): boolean {
  return trusted.some(([range, bits]) => range.kind() === address.kind() && address.match(range, bits))
}

/** One X-Forwarded-For entry without the port or brackets some proxies add (`[2001:db8::1]:443`, `192.0.2.1:80`). */
function parseForwardedEntry(entry: string): Address | null {
  const bracketed = /^\[([^\]]+)\](?::\d+)?$/.exec(entry)
  if (bracketed) return parseAddress(bracketed[1]!)
  const v4WithPort = /^(\d{1,3}(?:\.\d{1,3}){3}):\d+$/.exec(entry)
  return parseAddress(v4WithPort ? v4WithPort[1]! : entry)
}

/**
 * The client's address. The socket's address, unless it is a trusted proxy: then X-Forwarded-For is
 * read from the right (each proxy appends the address it was reached from), skipping trusted hops,
 * and the first address that is not a trusted proxy is the client. Entries further left were written
 * by the client itself and are never believed. A malformed entry ends the walk at the last hop known
 * good. IPv4-mapped IPv6 comes back as IPv4. 'unknown' when the socket has no address.
 */
export function clientAddressFrom(socketAddress: string | undefined, forwardedFor: string | undefined, trusted: TrustedRange[]): string {
  let current = socketAddress ? parseAddress(socketAddress) : null
  if (!current) return socketAddress || 'unknown'
  if (!forwardedFor || !trusted.length) return current.toString()
  const hops = forwardedFor.split(',').map(s => s.trim()).filter(Boolean)
  while (isTrusted(current, trusted)) {
    const entry = hops.pop()
    if (entry === undefined) break
    const next = parseForwardedEntry(entry)
    if (!next) break
    current = next
  }
  return current.toString()
}

/**
 * The key the limits count `address` under: an IPv4 address as it is, an IPv6 address by its /64
 * (`2001:db8:1:2::/64`), because one household or one server usually holds a whole /64 and could
 * otherwise take a fresh address for every guess. Anything that is not an address is its own key.
 */
export function addressGroup(address: string): string {
  const parsed = parseAddress(address)
  if (!parsed) return address
  if (parsed.kind() === 'ipv4') return parsed.toString()
  const parts = (parsed as ipaddr.IPv6).parts.slice(0, 4)
  const network = new ipaddr.IPv6([...parts, 0, 0, 0, 0])
  return `${network.toString()}/64`
}
