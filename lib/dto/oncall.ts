import type { Shift } from "@/lib/oncall/rota";

export interface ShiftDto extends Shift {
  primaryName: string;
  backupName: string | null;
}

export interface MailDto {
  id: number;
  from: string;
  to: string;
  subject: string;
  text: string;
  receivedAt: number;
}
