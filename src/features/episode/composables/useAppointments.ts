import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { CancelAppointmentInput, CreateAppointmentInput, MoveAppointmentInput } from '@shared/schemas/appointments'
import {
  bookAppointment,
  cancelAppointment,
  completeTask,
  listAppointments,
  listInfusionSessions,
  listOutbox,
  listTasks,
  moveAppointment,
} from '@/api/appointments'
import type { AppointmentView, OutboxRow, PatientTask } from '@shared/appointments/views'
import { referralKeys } from './useReferrals'

/** Appointments, their messages, the unit's sessions and patients' requests share one prefix. */
export const appointmentKeys = {
  all: ['appointments'] as const,
  list: (referralId: number) => [...appointmentKeys.all, 'referral', referralId] as const,
  outbox: (referralId: number) => [...appointmentKeys.all, 'outbox', referralId] as const,
  sessions: (from: string, to: string) => [...appointmentKeys.all, 'sessions', from, to] as const,
  tasks: () => [...appointmentKeys.all, 'tasks', 'open'] as const,
}

const TASKS_POLL_MS = 15_000

// Polls ask "has it changed?" (ETag, 304) with the data already shown, and stop while the tab is
// hidden; coming back to the tab refetches at once.
const POLLING = { refetchIntervalInBackground: false, refetchOnWindowFocus: true } as const

export function useAppointmentsQuery(referralId: MaybeRefOrGetter<number>) {
  const queryClient = useQueryClient()
  return useQuery({
    queryKey: computed(() => appointmentKeys.list(toValue(referralId))),
    queryFn: ({ queryKey }) => listAppointments(toValue(referralId), queryClient.getQueryData<{ rows: AppointmentView[] }>(queryKey)),
    // Kept fresh by the episode screen's one poll (useEpisodeUpdates), which writes it here.
    refetchOnWindowFocus: false,
  })
}

export function useOutboxQuery(referralId: MaybeRefOrGetter<number>, enabled: MaybeRefOrGetter<boolean> = true) {
  const queryClient = useQueryClient()
  return useQuery({
    queryKey: computed(() => appointmentKeys.outbox(toValue(referralId))),
    queryFn: ({ queryKey }) => listOutbox(toValue(referralId), queryClient.getQueryData<{ rows: OutboxRow[] }>(queryKey)),
    enabled: computed(() => toValue(enabled)),
    // Kept fresh by the episode screen's one poll (useEpisodeUpdates), which writes it here.
    refetchOnWindowFocus: false,
  })
}

export function useInfusionSessionsQuery(range: MaybeRefOrGetter<{ from: string; to: string } | null>) {
  return useQuery({
    queryKey: computed(() => {
      const r = toValue(range)
      return appointmentKeys.sessions(r?.from ?? '', r?.to ?? '')
    }),
    queryFn: () => {
      const r = toValue(range)!
      return listInfusionSessions(r.from, r.to)
    },
    enabled: computed(() => toValue(range) !== null),
  })
}

export function useTasksQuery() {
  const queryClient = useQueryClient()
  return useQuery({
    queryKey: appointmentKeys.tasks(),
    queryFn: ({ queryKey }) => listTasks(queryClient.getQueryData<{ rows: PatientTask[] }>(queryKey)),
    refetchInterval: TASKS_POLL_MS,
    ...POLLING,
  })
}

/** A booking changes the episode's list, its messages, the session's chairs and the worklist's next visit. */
function useInvalidateAppointments() {
  const queryClient = useQueryClient()
  return () =>
    Promise.all([
      queryClient.invalidateQueries({ queryKey: appointmentKeys.all }),
      queryClient.invalidateQueries({ queryKey: referralKeys.all }),
    ])
}

export function useBookAppointmentMutation() {
  const invalidate = useInvalidateAppointments()
  return useMutation({ mutationFn: (input: CreateAppointmentInput) => bookAppointment(input), onSuccess: invalidate })
}

export function useMoveAppointmentMutation() {
  const invalidate = useInvalidateAppointments()
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: MoveAppointmentInput }) => moveAppointment(id, input),
    // A stale version (409) means our copy is old: refetch whether it worked or not.
    onSettled: invalidate,
  })
}

export function useCancelAppointmentMutation() {
  const invalidate = useInvalidateAppointments()
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: CancelAppointmentInput }) => cancelAppointment(id, input),
    onSettled: invalidate,
  })
}

export function useCompleteTaskMutation() {
  const invalidate = useInvalidateAppointments()
  return useMutation({ mutationFn: (id: number) => completeTask(id), onSettled: invalidate })
}
