import { Role } from '../../../shared/schemas/auth'
import { roleWording } from '@/wording/roles'

/** Roles for pickers, in the order a lab usually thinks of them. */
export const roleOptions = Role.options.map((value) => ({ value, title: roleWording[value].label }))
