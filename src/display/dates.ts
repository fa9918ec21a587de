import dayjs from 'dayjs'

/** '14 Dec 2026' — day first, month in words, so no one misreads 03/04. */
export function formatDate(value: string | null | undefined): string {
  return value ? dayjs(value).format('D MMM YYYY') : '—'
}

export function formatDateTime(value: string | null | undefined): string {
  return value ? dayjs(value).format('D MMM YYYY, HH:mm') : '—'
}

/** "in 9 days", "today", "3 days ago": the distance that decides what the clinic does. */
export function daysToSurgeryText(days: number): string {
  if (days === 0) return 'today'
  if (days === 1) return 'tomorrow'
  if (days > 0) return `in ${days} days`
  return days === -1 ? 'yesterday' : `${-days} days ago`
}
