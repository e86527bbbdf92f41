/** One message as the local mail sink stores it and its read API returns it. */
export interface MailMessage {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
}
