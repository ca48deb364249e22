"use client";

import { createContext, useContext, useEffect, useState } from "react";
import { io } from "socket.io-client";
import { createSiteRooms, type LiveSocket, type SiteRooms } from "./site-rooms";

const SiteRoomsContext = createContext<SiteRooms | null>(null);

/** The tab's one socket.io connection, shared by every live panel below it. */
export function SocketProvider({ children }: { children: React.ReactNode }) {
  const [rooms] = useState(createSiteRooms);
  useEffect(() => {
    const socket: LiveSocket = io({ transports: ["websocket", "polling"], autoConnect: false });
    const detach = rooms.attach(socket);
    return () => {
      detach();
      socket.disconnect();
    };
  }, [rooms]);
  return <SiteRoomsContext value={rooms}>{children}</SiteRoomsContext>;
}

export function useSiteRooms(): SiteRooms {
  const rooms = useContext(SiteRoomsContext);
  if (!rooms) throw new Error("Live panels need a <SocketProvider> above them.");
  return rooms;
}
