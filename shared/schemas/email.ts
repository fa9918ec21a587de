import * as yup from 'yup'

/**
 * An e-mail address. RFC 5321 allows a path of 256 octets including the angle brackets, so an
 * address is at most 254 characters; a column that holds fewer passes its own `max`.
 */
export const EMAIL_MAX_LENGTH = 254
export function emailField(label = 'E-mail', max = EMAIL_MAX_LENGTH) {
  return yup.string().trim().lowercase().max(max, `${label} must be at most ${max} characters`).email(`${label} must be a valid address`)
}
