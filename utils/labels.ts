// Words for the stored role and ensemble kinds (the values stay machine-like).

/** Words for roles (the stored values stay machine-like). */
export function roleLabel(role: string | null | undefined): string {
  switch (role) {
    case 'director': return 'Director'
    case 'section_leader': return 'Section leader'
    case 'player': return 'Player'
    case 'admin': return 'Site admin'
    default: return 'No role'
  }
}

/** Words for an ensemble's kind. */
export function kindLabel(kind: string | null | undefined): string {
  switch (kind) {
    case 'choir': return 'Choir'
    case 'brass_band': return 'Brass band'
    case 'wind_band': return 'Wind band'
    case 'mixed': return 'Mixed ensemble'
    default: return kind ?? '—'
  }
}
