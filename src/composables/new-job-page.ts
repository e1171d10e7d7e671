import { useJobsStore } from '@/stores/jobs'
import { useStaffStore } from '@/stores/staff'
import { useNewRecordPage } from './record-forms'

/** The "open a job" dialog of the jobs list and a vehicle's page, which goes to the job once opened. */
export function useNewJobPage() {
  const staff = useStaffStore()
  const form = useNewRecordPage(useJobsStore(), (saved) => `Job opened for ${saved.registration}.`, 'job')

  /** Opens the dialog, fetching the team once for its technician list. */
  function start(): void {
    if (!staff.hasLoaded) void staff.load()
    form.start()
  }

  return { ...form, start }
}
