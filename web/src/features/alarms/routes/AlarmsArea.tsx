import { Route, Routes } from 'react-router-dom';
import { NotFoundPage } from '@web/app/routes/NotFoundPage';
import AlarmsInboxPage from './AlarmsInboxPage';
import AlarmPage from './AlarmPage';

/** /alarms (the inbox, its filter in the address) and /alarms/:alarmId (one alarm and its follow-up). */
export default function AlarmsArea() {
  return (
    <Routes>
      <Route index element={<AlarmsInboxPage />} />
      <Route path=":alarmId" element={<AlarmPage />} />
      <Route path="*" element={<NotFoundPage />} />
    </Routes>
  );
}
