/**
 * Answers in the shape of Twilio's REST errors, `{ code, message, more_info, status }` (Twilio, "Error
 * and warning dictionary", https://www.twilio.com/docs/api/errors), which the `twilio` SDK turns into
 * a RestException with the same code, message, moreInfo and status. The codes are Twilio's; the
 * wording of the messages is from memory of Twilio's answers, not copied from a page.
 */
export class FakeTwilioError extends Error {
  constructor(
    readonly status: number,
    readonly code: number,
    message: string,
  ) {
    super(message)
  }

  toBody(): { code: number; message: string; more_info: string; status: number } {
    return { code: this.code, message: this.message, more_info: `https://www.twilio.com/docs/errors/${this.code}`, status: this.status }
  }
}

const invalid = (code: number, message: string) => new FakeTwilioError(400, code, message)

export const errors = {
  authenticate: (why: string) => new FakeTwilioError(401, 20003, `Authenticate: ${why}`),
  notFound: (path: string) => new FakeTwilioError(404, 20404, `The requested resource ${path} was not found`),
  unknownParameter: (name: string) =>
    invalid(20001, `Unknown parameter: ${name} (the SMS fake implements only the parameters listed in docker-free-dev/README.md)`),
  toRequired: () => invalid(21604, "A 'To' phone number is required."),
  fromRequired: () => invalid(21603, "A 'From' phone number is required."),
  bodyRequired: () => invalid(21602, 'Message body is required.'),
  bodyTooLong: () => invalid(21617, 'The concatenated message body exceeds the 1600 character limit.'),
  invalidTo: (to: string) => invalid(21211, `The 'To' number ${to} is not a valid phone number.`),
  invalidFrom: (from: string) =>
    invalid(21212, `The 'From' number ${from} is not a valid phone number, shortcode, or alphanumeric sender ID.`),
  fromNotOwned: (from: string) =>
    invalid(21606, `The From phone number ${from} is not a valid, SMS-capable inbound phone number or short code for your account.`),
  fromQueueFull: (from: string) => invalid(21611, `This 'From' number ${from} has exceeded the maximum number of queued messages.`),
  notRoutable: (to: string, from: string) =>
    invalid(21612, `The 'To' phone number: ${to}, is not currently reachable using the 'From' phone number: ${from} via SMS.`),
  noRegionPermission: (to: string) =>
    invalid(21408, `Permission to send an SMS has not been enabled for the region indicated by the 'To' number: ${to}.`),
  unsubscribed: () => invalid(21610, 'Attempt to send to unsubscribed recipient'),
  notMobile: (to: string) => invalid(21614, `'To' number ${to} is not a valid mobile number`),
  invalidMessagingService: (sid: string) => invalid(21701, `The Messaging Service Sid ${sid} is invalid.`),
  invalidStatusCallback: (why: string) => invalid(21609, `Invalid StatusCallback url: ${why}`),
}
