/** The HTTP error for a section change that could not be made. */
export function sectionError (code: 'not_found' | 'section_name_taken' | 'same_section' | 'move_to_required' | 'bad_order') {
  switch (code) {
    case 'not_found': return apiError(404, 'not_found', 'Section not found')
    case 'section_name_taken': return apiError(409, 'section_name_taken', 'Another section already has that name', { issues: [{ path: ['name'], message: 'Another section already has that name', code: 'section_name_taken' }] })
    case 'same_section': return apiError(400, 'same_section', 'Choose a different section', { issues: [{ path: ['intoId'], message: 'Choose a different section', code: 'same_section' }] })
    case 'move_to_required': return apiError(409, 'move_to_required', 'Choose the section its members move to', { issues: [{ path: ['moveTo'], message: 'Choose the section its members move to', code: 'move_to_required' }] })
    case 'bad_order': return apiError(400, 'bad_order', 'List every section of the ensemble once', { issues: [{ path: ['ids'], message: 'List every section of the ensemble once', code: 'bad_order' }] })
  }
}
